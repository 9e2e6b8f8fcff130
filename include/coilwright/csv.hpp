#pragma once
// Reading comma-separated files: a general line splitter and the point-list reader.
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include "coilwright/geometry.hpp"

namespace coilwright {

// The most rows a point list may have; a longer file is refused as soon as the limit is passed,
// without reading the rest (a million points already take seconds per field evaluation).
inline constexpr std::size_t kMaxPointRows = 1'000'000;

// Splits one CSV line into fields. A field may be quoted ("a, b"), with "" standing for one
// quote inside it; spaces around unquoted fields are trimmed. Throws InputError (the column in
// where(); the caller adds file and line) on an unterminated quote or text after a closing quote.
[[nodiscard]] std::vector<std::string> split_csv_line(std::string_view line);

namespace detail {
// One field of a CSV line and the character column where it starts (from 1), for messages.
struct CsvField {
  std::string text;
  std::size_t column = 1;
};
// split_csv_line keeping each field's column; its InputError carries the column in where().
[[nodiscard]] std::vector<CsvField> split_csv_fields(std::string_view line);
}  // namespace detail

// Parses points from CSV text whose header row names at least the columns x, y, z (any order,
// any other columns ignored), values in metres; `file` names it in messages. Blank lines and
// lines starting with '#' are skipped; a byte-order mark and CRLF line ends are accepted
// (text_lines.hpp). Throws InputError naming the file, line, column and the text found.
[[nodiscard]] PointSet parse_points_csv(std::string_view text, std::string file);
// Reads a file a block at a time and parses it as above; InputError if it cannot be read.
// `line_numbers`, when given, receives the file line of each point (for later messages).
[[nodiscard]] PointSet read_points_csv(const std::filesystem::path& file, std::vector<std::size_t>* line_numbers = nullptr);

}  // namespace coilwright
