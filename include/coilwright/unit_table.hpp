#pragma once
// Tables of readings in CSV whose header names each column with an optional unit in brackets
// ("Bx[uT]", "x [mm]", "coil-x[A]"). Shared by the survey, measured-map and calibration readers:
// this module only splits the file and converts cells; each reader decides which columns it wants.
#include <cstddef>
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include "coilwright/units.hpp"

namespace coilwright {

// The most data rows a table may have: surveys, measured maps and calibration readings are
// hundreds to thousands of rows, and a larger file is refused as soon as the limit is passed
// (memory stays bounded: the fit of a degree-8 survey holds 3 x 80 doubles a row).
inline constexpr std::size_t kMaxTableRows = 100'000;

// One column of the header: "Bx[uT]" gives name "Bx", unit "uT".
struct TableColumn {
  std::string name;    // as written, trimmed
  std::string unit;    // inside the brackets, trimmed; empty = the SI unit
  std::string header;  // the whole header cell, for messages
  std::size_t column = 0;  // character column where the cell starts, from 1
};

struct TableRow {
  std::size_t line = 0;            // line in the file, from 1
  std::vector<std::string> cells;  // one per column, trimmed
  std::vector<std::size_t> columns;  // character column where each cell starts, from 1
};

struct UnitTable {
  std::string file;                  // for messages
  std::size_t header_line = 0;       // line of the header, from 1
  std::vector<TableColumn> columns;
  std::vector<TableRow> rows;

  // Index of the column whose name equals `name` (ASCII case-insensitive), or npos.
  [[nodiscard]] std::size_t find(std::string_view name) const noexcept;
  static constexpr std::size_t npos = static_cast<std::size_t>(-1);
};

// Column names compare ASCII case-insensitively ("bx" is "Bx").
[[nodiscard]] bool same_column_name(std::string_view a, std::string_view b) noexcept;

// Splits CSV text into a header and rows. Blank lines and lines whose first non-blank character
// is '#' are skipped; a leading UTF-8 byte-order mark and a '\r' before the line end are dropped
// (spreadsheet files). A row with more or fewer cells than the header, a header cell with an
// unclosed bracket, a binary file or more than kMaxTableRows rows is an InputError naming the
// file, line and column.
[[nodiscard]] UnitTable parse_unit_table(std::string_view text, std::string file);
// Reads and parses a file a block at a time; InputError if it cannot be read or has no header.
[[nodiscard]] UnitTable read_unit_table(const std::filesystem::path& file);

// Factor from the unit of column `col` to SI for a quantity of dimension `d` (1 when no unit
// is given). InputError naming the file, header line and column, and the accepted units otherwise.
[[nodiscard]] double column_scale(const UnitTable& table, std::size_t col, Dimension d);

// The number in cell `col` of `row` times `scale`. InputError naming file:line:column, the
// column's header as the key, the text found and that a finite plain number is expected (also
// when the product overflows, or the cell carries a unit of its own).
[[nodiscard]] double cell_value(const UnitTable& table, const TableRow& row, std::size_t col, double scale);

}  // namespace coilwright
