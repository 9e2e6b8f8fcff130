#pragma once
// Progress on stderr for work longer than two seconds: a bar on a terminal, plain lines otherwise.
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <string>

#include <fmt/format.h>

namespace coilwright::cli {

class Progress {
 public:
  Progress(std::string what, bool quiet) : what_(std::move(what)), quiet_(quiet), tty_(::isatty(2) != 0) {}
  ~Progress() { finish(); }
  void update(double done, double total, const std::string& note) {
    if (quiet_) return;
    const auto now = Clock::now();
    const double elapsed = std::chrono::duration<double>(now - start_).count();
    if (elapsed < 2.0) return;
    const double frac = total > 0 ? std::min(1.0, done / total) : 0.0;
    if (tty_) {
      constexpr int kWidth = 30;
      const int fill = static_cast<int>(frac * kWidth);
      fmt::print(stderr, "\r{} [{}{}] {:3.0f}% {:.0f} s {}\x1b[K", what_, std::string(fill, '#'), std::string(kWidth - fill, '.'),
                 100 * frac, elapsed, note);
      shown_ = true;
    } else if (now - last_ > std::chrono::seconds(5)) {
      fmt::print(stderr, "{}: {:.0f}% after {:.0f} s {}\n", what_, 100 * frac, elapsed, note);
      last_ = now;
    }
    std::fflush(stderr);
  }
  void finish() {
    if (shown_ && tty_) fmt::print(stderr, "\n");
    shown_ = false;
  }

 private:
  using Clock = std::chrono::steady_clock;
  std::string what_;
  bool quiet_, tty_;
  bool shown_ = false;
  Clock::time_point start_ = Clock::now(), last_ = Clock::now();
};

}  // namespace coilwright::cli
