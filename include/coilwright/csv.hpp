#pragma once
// Reading comma-separated files: a general line splitter and the point-list reader.
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include "coilwright/geometry.hpp"

namespace coilwright {

// Splits one CSV line into fields. A field may be quoted ("a, b"), with "" standing for one
// quote inside it; spaces around unquoted fields are trimmed. Throws InputError (message
// only; the caller adds the location) on an unterminated quote or text after a closing quote.
[[nodiscard]] std::vector<std::string> split_csv_line(std::string_view line);

// Reads points from a CSV file whose header row names at least the columns x, y, z (any order,
// any other columns ignored), values in metres. Blank lines and lines starting with '#' are
// skipped. Throws InputError naming the file, line, column and the text found.
[[nodiscard]] PointSet read_points_csv(const std::filesystem::path& file);

}  // namespace coilwright
