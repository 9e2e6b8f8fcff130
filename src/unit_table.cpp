#include "coilwright/unit_table.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <fstream>
#include <sstream>
#include <system_error>
#include <utility>

#include <fmt/format.h>

#include "coilwright/csv.hpp"
#include "coilwright/error.hpp"

namespace coilwright {

namespace detail {
namespace {

std::string_view trim_blank(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t' || s.back() == '\r')) s.remove_suffix(1);
  return s;
}

char lower(char c) { return (c >= 'A' && c <= 'Z') ? static_cast<char>(c - 'A' + 'a') : c; }

bool iequal(std::string_view a, std::string_view b) {
  return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(), [](char x, char y) { return lower(x) == lower(y); });
}

TableColumn parse_header_cell(std::string_view cell, const SourceLocation& where) {
  TableColumn col;
  col.header = std::string(trim_blank(cell));
  const std::string_view h = col.header;
  const std::size_t open = h.find('[');
  if (open == std::string_view::npos) {
    if (h.find(']') != std::string_view::npos)
      throw InputError(where, "", "column '" + col.header + "': a ']' without '[': write a unit as name[unit], e.g. \"Bx[uT]\"");
    col.name = col.header;
    return col;
  }
  const std::size_t close = h.find(']', open);
  if (close == std::string_view::npos || trim_blank(h.substr(close + 1)).size() != 0)
    throw InputError(where, "", "column '" + col.header + "': a column with a unit is written name[unit], e.g. \"Bx[uT]\"");
  col.name = std::string(trim_blank(h.substr(0, open)));
  col.unit = std::string(trim_blank(h.substr(open + 1, close - open - 1)));
  if (col.name.empty()) throw InputError(where, "", "column '" + col.header + "': the column has a unit but no name");
  return col;
}

}  // namespace
}  // namespace detail

bool same_column_name(std::string_view a, std::string_view b) noexcept { return detail::iequal(a, b); }

std::size_t UnitTable::find(std::string_view name) const noexcept {
  for (std::size_t i = 0; i < columns.size(); ++i)
    if (detail::iequal(columns[i].name, name)) return i;
  return npos;
}

UnitTable parse_unit_table(std::string_view text, std::string file) {
  UnitTable table;
  table.file = std::move(file);
  std::size_t line_no = 0;
  std::size_t pos = 0;
  while (pos <= text.size()) {
    const std::size_t end = std::min(text.find('\n', pos), text.size());
    const std::string_view raw = text.substr(pos, end - pos);
    pos = end + 1;
    ++line_no;
    const std::string_view line = detail::trim_blank(raw);
    if (line.empty() || line.front() == '#') {
      if (end == text.size()) break;
      continue;
    }
    const SourceLocation where{table.file, line_no, 0};
    std::vector<std::string> cells;
    try {
      cells = split_csv_line(line);
    } catch (const InputError& e) {
      throw InputError(where, "", e.what());
    }
    if (table.header_line == 0) {
      table.header_line = line_no;
      for (const auto& c : cells) table.columns.push_back(detail::parse_header_cell(c, where));
      for (std::size_t i = 0; i < table.columns.size(); ++i)
        for (std::size_t j = 0; j < i; ++j)
          if (detail::iequal(table.columns[i].name, table.columns[j].name))
            throw InputError(where, "", fmt::format("column '{}' appears twice", table.columns[i].name));
    } else {
      if (cells.size() != table.columns.size()) {
        std::string names;
        for (const auto& c : table.columns) names += (names.empty() ? "" : ", ") + c.header;
        throw InputError(where, "", fmt::format("{} value(s) found; the header at line {} names {} column(s): {}",
                                                cells.size(), table.header_line, table.columns.size(), names));
      }
      for (auto& c : cells) c = std::string(detail::trim_blank(c));
      table.rows.push_back({line_no, std::move(cells)});
    }
    if (end == text.size()) break;
  }
  if (table.header_line == 0)
    throw InputError(SourceLocation{table.file, 0, 0}, "", "no header row found (the file is empty or all comments)");
  return table;
}

UnitTable read_unit_table(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(SourceLocation{file.string(), 0, 0}, "", "cannot open the file for reading");
  std::ostringstream ss;
  ss << in.rdbuf();
  return parse_unit_table(ss.str(), file.string());
}

double column_scale(const UnitTable& table, std::size_t col, Dimension d) {
  const TableColumn& c = table.columns.at(col);
  if (c.unit.empty()) return 1.0;
  try {
    return parse_quantity("1 " + c.unit, d);
  } catch (const UnitParseError&) {
    throw InputError(SourceLocation{table.file, table.header_line, 0}, "",
                     fmt::format("column '{}': unit '{}' is not a unit of {}; accepted: {} (no unit = {})", c.header, c.unit,
                                 dimension_name(d), accepted_units(d), si_unit(d)));
  }
}

double cell_value(const UnitTable& table, const TableRow& row, std::size_t col, double scale) {
  const std::string& text = row.cells.at(col);
  std::string_view num = text;
  if (!num.empty() && num.front() == '+') num.remove_prefix(1);
  double v = 0.0;
  const auto [end, ec] = std::from_chars(num.data(), num.data() + num.size(), v);
  if (text.empty() || ec != std::errc{} || end != num.data() + num.size() || !std::isfinite(v)) {
    const TableColumn& c = table.columns.at(col);
    throw InputError(SourceLocation{table.file, row.line, 0}, "",
                     fmt::format("column '{}': found \"{}\"; a finite plain number is expected{}", c.header, text,
                                 c.unit.empty() ? std::string{} : fmt::format(" (the unit, {}, is in the header)", c.unit)));
  }
  return v * scale;
}

}  // namespace coilwright
