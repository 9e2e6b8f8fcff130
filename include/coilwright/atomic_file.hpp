#pragma once
// Results are written to a temporary name in the destination folder and renamed into place,
// so a reader never sees a half-written file and an interrupted run leaves the old one intact.
#include <filesystem>
#include <string_view>

namespace coilwright {

// Writes `content` to `path` atomically (temporary file, flush, fsync, rename). Creates missing
// parent folders. Throws OutputError naming the path and the system's reason.
void write_file_atomic(const std::filesystem::path& path, std::string_view content);

}  // namespace coilwright
