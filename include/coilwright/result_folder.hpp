#pragma once
// Publishing a results folder as one unit. The new files are written into a staging folder
// beside the destination, which is then exchanged with the destination in a single rename
// (Linux renameat2 with RENAME_EXCHANGE). A reader, or a run killed at any moment, finds
// either the previous complete set of results or the new one, never a mix of the two.
#include <filesystem>
#include <functional>
#include <string>
#include <string_view>

namespace coilwright {

// True for the names coilwright writes into a results folder (and may therefore replace).
using OwnedName = std::function<bool(const std::string& name)>;

// Calls write(staging) to fill a fresh staging folder, then puts it in place of `dir`.
// Entries of an existing `dir` that are not `ours` are carried into the new folder (hard links,
// or copies where a link is impossible), so nothing of the user's is lost or changed; our old
// files go with the previous folder. If write() throws, or the folder cannot be written, the
// staging folder is removed, `dir` is left exactly as it was, and the exception propagates
// (OutputError names the path and the system's reason).
void publish_folder(const std::filesystem::path& dir, const std::function<void(const std::filesystem::path&)>& write,
                    const OwnedName& ours);

// Checks early (before a long search) that publish_folder() will be able to create its
// staging folder beside `dir`; throws the same OutputError it would.
void probe_folder(const std::filesystem::path& dir);

// A folder name made from free text such as a project name: ASCII letters, digits, '-', '_'
// and '.' are kept, anything else becomes '-', and leading dots are dropped, so the name
// cannot climb out of its parent or hide itself. Empty text gives "unnamed".
[[nodiscard]] std::string safe_folder_name(std::string_view text);

}  // namespace coilwright
