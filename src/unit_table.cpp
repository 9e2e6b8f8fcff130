#include "coilwright/unit_table.hpp"

#include <algorithm>
#include <charconv>
#include <cctype>
#include <cmath>
#include <fstream>
#include <system_error>
#include <utility>

#include <fmt/format.h>

#include "coilwright/csv.hpp"
#include "coilwright/error.hpp"
#include "coilwright/text_lines.hpp"

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
      throw InputError(where, col.header, "a ']' without '['; accepted: a name, or a name and its unit as name[unit], e.g. \"Bx[uT]\"");
    col.name = col.header;
    return col;
  }
  const std::size_t close = h.find(']', open);
  if (close == std::string_view::npos || trim_blank(h.substr(close + 1)).size() != 0)
    throw InputError(where, col.header, "the unit's brackets are not closed, or text follows them; accepted: name[unit], e.g. \"Bx[uT]\"");
  col.name = std::string(trim_blank(h.substr(0, open)));
  col.unit = std::string(trim_blank(h.substr(open + 1, close - open - 1)));
  if (col.name.empty()) throw InputError(where, col.header, "the column has a unit but no name; accepted: name[unit], e.g. \"Bx[uT]\"");
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

namespace detail {
namespace {

UnitTable read_table(LineReader& lines) {
  UnitTable table;
  table.file = lines.file();
  std::string_view raw;
  while (lines.next(raw)) {
    const std::size_t line_no = lines.line_number();
    const std::string_view line = trim_blank(raw);
    if (line.empty() || line.front() == '#') continue;
    const std::size_t indent = static_cast<std::size_t>(line.data() - raw.data());
    std::vector<CsvField> cells;
    try {
      cells = split_csv_fields(line);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{table.file, line_no, e.where().column + indent}, "", e.what());
    }
    for (auto& c : cells) c.column += indent;
    if (table.header_line == 0) {
      table.header_line = line_no;
      for (const auto& c : cells) {
        table.columns.push_back(parse_header_cell(c.text, SourceLocation{table.file, line_no, c.column}));
        table.columns.back().column = c.column;
      }
      for (std::size_t i = 0; i < table.columns.size(); ++i)
        for (std::size_t j = 0; j < i; ++j)
          if (iequal(table.columns[i].name, table.columns[j].name))
            throw InputError(SourceLocation{table.file, line_no, table.columns[i].column}, table.columns[i].header,
                             fmt::format("column '{}' appears twice (first at column {}); accepted: each column once",
                                         table.columns[i].name, table.columns[j].column));
      continue;
    }
    if (cells.size() != table.columns.size()) {
      std::string names;
      for (const auto& c : table.columns) names += (names.empty() ? "" : ", ") + c.header;
      // Where the row departs from the header: its first extra value, or the end of the line.
      const std::size_t column = cells.size() > table.columns.size() ? cells[table.columns.size()].column : raw.size() + 1;
      throw InputError(SourceLocation{table.file, line_no, column}, "",
                       fmt::format("{} value(s) found; the header at line {} names {} column(s): {}", cells.size(),
                                   table.header_line, table.columns.size(), names));
    }
    if (table.rows.size() == kMaxTableRows)
      throw InputError(SourceLocation{table.file, line_no, 1}, "",
                       fmt::format("more than {} data rows; accepted: at most {} rows in one table (split the file)",
                                   kMaxTableRows, kMaxTableRows));
    TableRow row;
    row.line = line_no;
    for (auto& c : cells) {
      row.cells.emplace_back(trim_blank(c.text));
      row.columns.push_back(c.column);
    }
    table.rows.push_back(std::move(row));
  }
  if (table.header_line == 0)
    throw InputError(SourceLocation{table.file, 0, 0}, "",
                     "no header row found (the file is empty or all comments); accepted: a header row naming the columns "
                     "with their units, e.g. x[mm],y[mm],z[mm],Bx[uT],By[uT],Bz[uT], then one row per reading");
  return table;
}

}  // namespace
}  // namespace detail

UnitTable parse_unit_table(std::string_view text, std::string file) {
  LineReader lines(text, std::move(file));
  return detail::read_table(lines);
}

UnitTable read_unit_table(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(SourceLocation{file.string(), 0, 0}, "", "cannot open the file for reading");
  LineReader lines(in, file.string());
  return detail::read_table(lines);
}

double column_scale(const UnitTable& table, std::size_t col, Dimension d) {
  const TableColumn& c = table.columns.at(col);
  if (c.unit.empty()) return 1.0;
  try {
    return parse_quantity("1 " + c.unit, d);
  } catch (const UnitParseError&) {
    throw InputError(SourceLocation{table.file, table.header_line, c.column}, c.header,
                     fmt::format("unit '{}' is not a unit of {}; accepted: {} (no unit = {})", c.unit, dimension_name(d),
                                 accepted_units(d), si_unit(d)));
  }
}

double cell_value(const UnitTable& table, const TableRow& row, std::size_t col, double scale) {
  const std::string& text = row.cells.at(col);
  const TableColumn& c = table.columns.at(col);
  const SourceLocation at{table.file, row.line, col < row.columns.size() ? row.columns[col] : 0};
  const std::string in_unit = c.unit.empty() ? std::string{} : fmt::format(" (the unit, {}, is in the header)", c.unit);
  std::string_view num = text;
  if (!num.empty() && num.front() == '+') num.remove_prefix(1);
  double v = 0.0;
  const auto [end, ec] = std::from_chars(num.data(), num.data() + num.size(), v);
  if (ec == std::errc::result_out_of_range && end == num.data() + num.size())
    throw InputError(at, c.header, fmt::format("found \"{}\", out of the range of a double; accepted: a finite plain number{}", text, in_unit));
  if (!text.empty() && ec == std::errc{} && end != num.data() + num.size() && std::isfinite(v)) {
    // A number followed by text: most likely a unit written in the cell. Say so, and which
    // unit the header gives, rather than only "not a number".
    const std::string_view rest = detail::trim_blank(std::string_view(end, static_cast<std::size_t>(num.data() + num.size() - end)));
    if (!rest.empty() && (std::isalpha(static_cast<unsigned char>(rest.front())) || static_cast<unsigned char>(rest.front()) >= 0x80 ||
                          rest.front() == '%'))
      throw InputError(at, c.header,
                       c.unit.empty()
                           ? fmt::format("found \"{}\", a value with its own unit; accepted: a plain number in the SI "
                                         "unit, or the unit in the header, e.g. \"{}[{}]\"", text, c.name, rest)
                           : fmt::format("found \"{}\", a value with its own unit \"{}\", but the header gives the unit {}; "
                                         "accepted: a plain number in {}",
                                         text, rest, c.unit, c.unit));
  }
  if (text.empty() || ec != std::errc{} || end != num.data() + num.size() || !std::isfinite(v))
    throw InputError(at, c.header, fmt::format("found \"{}\"; accepted: a finite plain number{}", text, in_unit));
  const double si = v * scale;
  if (!std::isfinite(si))
    throw InputError(at, c.header,
                     fmt::format("found \"{}\", which is not finite once converted from {} to SI; accepted: a finite value", text, c.unit));
  return si;
}

}  // namespace coilwright
