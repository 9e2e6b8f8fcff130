#include "coilwright/result_folder.hpp"

#include <fcntl.h>
#include <signal.h>
#include <stdio.h>  // renameat2 (glibc >= 2.28)
#include <unistd.h>

#include <cctype>
#include <cerrno>
#include <cstring>
#include <string>
#include <system_error>

#include <fmt/format.h>

#include "coilwright/error.hpp"

namespace coilwright {

namespace fs = std::filesystem;

namespace {

[[noreturn]] void fail(const fs::path& path, std::string_view what, int err) {
  throw OutputError(fmt::format("cannot write the results folder '{}': {} ({})", path.string(), what, std::strerror(err)));
}

// Our scratch names beside `dir`: .<name>.staging-<pid> and .<name>.previous-<pid>.
std::string scratch_prefix(const fs::path& dir, std::string_view role) {
  return fmt::format(".{}.{}-", dir.filename().string(), role);
}

bool process_alive(long pid) { return pid > 0 && (::kill(static_cast<pid_t>(pid), 0) == 0 || errno == EPERM); }

// Removes scratch folders left by runs that were killed (their process is gone).
void remove_stale_scratch(const fs::path& parent, const fs::path& dir) {
  std::error_code ec;
  for (const std::string_view role : {"staging", "previous"}) {
    const std::string prefix = scratch_prefix(dir, role);
    for (fs::directory_iterator it(parent, ec), end; !ec && it != end; it.increment(ec)) {
      const std::string name = it->path().filename().string();
      if (name.rfind(prefix, 0) != 0) continue;
      const std::string digits = name.substr(prefix.size());
      if (digits.empty() || digits.find_first_not_of("0123456789") != std::string::npos || digits.size() > 9) continue;
      if (!process_alive(std::stol(digits))) fs::remove_all(it->path(), ec);
    }
  }
}

// Mirrors the user's entries of `from` into `to`: hard links for files, so the data is shared
// rather than copied; copies where the file system refuses links.
void carry_over(const fs::path& from, const fs::path& to, const OwnedName& ours) {
  std::error_code ec;
  for (fs::directory_iterator it(from, ec), end; !ec && it != end; it.increment(ec)) {
    const std::string name = it->path().filename().string();
    if (ours(name)) continue;
    const fs::path target = to / name;
    // `recursive` covers files and folders alike; symbolic links are copied as links.
    constexpr auto keep = fs::copy_options::recursive | fs::copy_options::copy_symlinks;
    std::error_code e;
    fs::copy(it->path(), target, keep | fs::copy_options::create_hard_links, e);
    if (e) fs::copy(it->path(), target, keep | fs::copy_options::overwrite_existing, e);
    if (e) fail(from, fmt::format("cannot keep the entry '{}' that is not ours", name), e.value());
  }
  if (ec) fail(from, "cannot list it", ec.value());
}

void sync_folder(const fs::path& dir) {
  const int fd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd >= 0) {
    (void)::fsync(fd);
    ::close(fd);
  }
}

// Where a results folder goes: its absolute path (a symbolic link to a folder followed, so the
// link stays as the user made it; a trailing slash dropped) and the folder that holds it, which
// is created. Throws OutputError if the path is taken by something that is not a folder.
struct Place {
  fs::path dir, parent;
  bool exists = false;
};

Place resolve(const fs::path& requested) {
  std::error_code ec;
  Place p;
  p.dir = fs::absolute(requested, ec).lexically_normal();
  if (ec) fail(requested, "cannot resolve the path", ec.value());
  if (fs::is_symlink(p.dir, ec)) p.dir = fs::canonical(p.dir, ec);
  if (p.dir.filename().empty()) p.dir = p.dir.parent_path();
  p.parent = p.dir.parent_path();
  p.exists = fs::exists(p.dir, ec);
  if (p.exists && !fs::is_directory(p.dir, ec)) fail(p.dir, "it exists and is not a folder", ENOTDIR);
  fs::create_directories(p.parent, ec);
  if (ec) fail(p.dir, "cannot create the folder that holds it", ec.value());
  return p;
}

// This process's scratch folder beside the results folder: .<name>.<role>-<pid>.
fs::path scratch_path(const Place& p, std::string_view role) {
  return p.parent / (scratch_prefix(p.dir, role) + std::to_string(::getpid()));
}

}  // namespace

void publish_folder(const fs::path& requested, const std::function<void(const fs::path&)>& write, const OwnedName& ours) {
  const Place place = resolve(requested);
  const fs::path &dir = place.dir, &parent = place.parent;
  const bool exists = place.exists;
  remove_stale_scratch(parent, dir);

  std::error_code ec;
  const fs::path staging = scratch_path(place, "staging");
  fs::remove_all(staging, ec);
  if (!fs::create_directory(staging, ec) || ec) fail(dir, fmt::format("cannot create the staging folder '{}'", staging.string()), ec ? ec.value() : EEXIST);
  try {
    write(staging);
    if (exists) carry_over(dir, staging, ours);
    sync_folder(staging);
    if (!exists) {
      if (::rename(staging.c_str(), dir.c_str()) != 0) fail(dir, "cannot move the new results into place", errno);
    } else if (::renameat2(AT_FDCWD, staging.c_str(), AT_FDCWD, dir.c_str(), RENAME_EXCHANGE) != 0) {
      if (errno != EINVAL && errno != ENOSYS) fail(dir, "cannot exchange the new results with the previous ones", errno);
      // A file system without atomic exchange: two renames. A run killed between them leaves
      // the previous results complete in .<name>.previous-<pid> and no mixed folder.
      const fs::path previous = scratch_path(place, "previous");
      if (::rename(dir.c_str(), previous.c_str()) != 0) fail(dir, "cannot move the previous results aside", errno);
      if (::rename(staging.c_str(), dir.c_str()) != 0) {
        const int err = errno;
        (void)::rename(previous.c_str(), dir.c_str());
        fail(dir, "cannot move the new results into place", err);
      }
      fs::rename(previous, staging, ec);
    }
  } catch (const OutputError& e) {
    fs::remove_all(staging, ec);
    // The failing file was in the staging folder: name the results folder the user asked for.
    throw OutputError(fmt::format("cannot write the results folder '{}'; the previous results there are unchanged: {}",
                                  dir.string(), e.what()));
  } catch (...) {
    fs::remove_all(staging, ec);
    throw;
  }
  sync_folder(parent);
  // `staging` now holds the previous results (our files, plus links to the user's entries,
  // which live on in `dir`).
  fs::remove_all(staging, ec);
}

void probe_folder(const fs::path& requested) {
  const Place place = resolve(requested);
  const fs::path probe = scratch_path(place, "staging");
  std::error_code ec;
  if (!fs::create_directory(probe, ec) || ec) fail(place.dir, "cannot create a folder beside it", ec ? ec.value() : EEXIST);
  fs::remove(probe, ec);
}

std::string safe_folder_name(std::string_view text) {
  std::string out;
  for (const char ch : text) {
    const auto c = static_cast<unsigned char>(ch);
    out.push_back(c < 0x80 && (std::isalnum(c) || ch == '-' || ch == '_' || ch == '.') ? ch : '-');
  }
  const std::size_t first = out.find_first_not_of('.');
  out = first == std::string::npos ? std::string() : out.substr(first);
  return out.empty() ? std::string("unnamed") : out;
}

}  // namespace coilwright
