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
    std::error_code e;
    if (it->is_symlink(e) || !it->is_directory(e)) {
      fs::copy(it->path(), target, fs::copy_options::create_hard_links | fs::copy_options::copy_symlinks, e);
      if (e) fs::copy(it->path(), target, fs::copy_options::copy_symlinks, e);
    } else {
      fs::copy(it->path(), target, fs::copy_options::recursive | fs::copy_options::create_hard_links | fs::copy_options::copy_symlinks, e);
      if (e) fs::copy(it->path(), target, fs::copy_options::recursive | fs::copy_options::copy_symlinks | fs::copy_options::overwrite_existing, e);
    }
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

}  // namespace

void publish_folder(const fs::path& requested, const std::function<void(const fs::path&)>& write, const OwnedName& ours) {
  // A symbolic link to a folder is followed, so the link itself stays as the user made it.
  std::error_code ec;
  fs::path dir = fs::absolute(requested, ec).lexically_normal();
  if (ec) fail(requested, "cannot resolve the path", ec.value());
  if (fs::is_symlink(dir, ec)) dir = fs::canonical(dir, ec);
  if (dir.filename().empty()) dir = dir.parent_path();
  const fs::path parent = dir.parent_path();
  const bool exists = fs::exists(dir, ec);
  if (exists && !fs::is_directory(dir, ec)) fail(dir, "it exists and is not a folder", ENOTDIR);
  fs::create_directories(parent, ec);
  if (ec) fail(dir, "cannot create the folder that holds it", ec.value());
  remove_stale_scratch(parent, dir);

  const fs::path staging = parent / (scratch_prefix(dir, "staging") + std::to_string(::getpid()));
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
      const fs::path previous = parent / (scratch_prefix(dir, "previous") + std::to_string(::getpid()));
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
  std::error_code ec;
  const fs::path dir = fs::absolute(requested, ec).lexically_normal();
  if (ec) fail(requested, "cannot resolve the path", ec.value());
  if (fs::exists(dir, ec) && !fs::is_directory(dir, ec)) fail(dir, "it exists and is not a folder", ENOTDIR);
  const fs::path parent = (dir.filename().empty() ? dir.parent_path() : dir).parent_path();
  fs::create_directories(parent, ec);
  if (ec) fail(dir, "cannot create the folder that holds it", ec.value());
  const fs::path probe = parent / (scratch_prefix(dir, "staging") + std::to_string(::getpid()));
  if (!fs::create_directory(probe, ec) || ec) fail(dir, "cannot create a folder beside it", ec ? ec.value() : EEXIST);
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
