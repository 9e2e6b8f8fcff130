#include "coilwright/atomic_file.hpp"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <system_error>

#include <fmt/format.h>

#include "coilwright/error.hpp"

namespace coilwright {

namespace {
[[noreturn]] void fail(const std::filesystem::path& path, std::string_view what, int err) {
  throw OutputError(fmt::format("cannot write '{}': {} ({})", path.string(), what, std::strerror(err)));
}
}  // namespace

void write_file_atomic(const std::filesystem::path& path, std::string_view content) {
  const auto parent = path.has_parent_path() ? path.parent_path() : std::filesystem::path(".");
  std::error_code ec;
  std::filesystem::create_directories(parent, ec);
  if (ec) fail(path, "cannot create its folder", ec.value());

  // The temporary name is ours alone (dot-prefixed, pid-suffixed) and lives beside the target,
  // so rename() is atomic on the same file system.
  const auto tmp = parent / fmt::format(".{}.tmp{}", path.filename().string(), ::getpid());
  const int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
  if (fd < 0) fail(path, "cannot create a temporary file", errno);
  const char* p = content.data();
  std::size_t left = content.size();
  while (left > 0) {
    const ssize_t n = ::write(fd, p, left);
    if (n < 0) {
      if (errno == EINTR) continue;
      const int err = errno;
      ::close(fd);
      ::unlink(tmp.c_str());
      fail(path, "write failed", err);
    }
    p += n;
    left -= static_cast<std::size_t>(n);
  }
  if (::fsync(fd) != 0 || ::close(fd) != 0) {
    const int err = errno;
    ::unlink(tmp.c_str());
    fail(path, "flush failed", err);
  }
  if (::rename(tmp.c_str(), path.c_str()) != 0) {
    const int err = errno;
    ::unlink(tmp.c_str());
    fail(path, "rename failed", err);
  }
}

}  // namespace coilwright
