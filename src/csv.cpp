#include "coilwright/csv.hpp"

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <fstream>
#include <optional>
#include <system_error>

#include <fmt/format.h>

#include "coilwright/error.hpp"
#include "coilwright/text_lines.hpp"
#include "coilwright/units.hpp"

namespace coilwright {

namespace detail {

namespace {
bool is_blank(char c) { return c == ' ' || c == '\t'; }
}  // namespace

// The splitter behind split_csv_line, keeping where each field starts for error messages.
std::vector<CsvField> split_csv_fields(std::string_view line) {
  if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
  std::vector<CsvField> out;
  std::size_t i = 0;
  const std::size_t n = line.size();
  while (true) {
    while (i < n && is_blank(line[i])) ++i;
    CsvField f;
    f.column = i + 1;
    if (i < n && line[i] == '"') {
      ++i;
      bool closed = false;
      while (i < n) {
        if (line[i] == '"') {
          if (i + 1 < n && line[i + 1] == '"') {
            f.text.push_back('"');
            i += 2;
            continue;
          }
          closed = true;
          ++i;
          break;
        }
        f.text.push_back(line[i++]);
      }
      if (!closed)
        throw InputError(SourceLocation{"", 0, f.column}, "",
                         "the quoted field is not closed; accepted: a field in double quotes, with \"\" for a quote inside it");
      while (i < n && is_blank(line[i])) ++i;
      if (i < n && line[i] != ',')
        throw InputError(SourceLocation{"", 0, i + 1}, "",
                         "text after the closing quote of a quoted field; accepted: a comma or the line end");
    } else {
      const std::size_t start = i;
      while (i < n && line[i] != ',') ++i;
      std::size_t end = i;
      while (end > start && is_blank(line[end - 1])) --end;
      f.text.assign(line.substr(start, end - start));
    }
    out.push_back(std::move(f));
    if (i >= n) break;
    ++i;  // the comma
  }
  return out;
}

}  // namespace detail

std::vector<std::string> split_csv_line(std::string_view line) {
  std::vector<std::string> out;
  for (auto& f : detail::split_csv_fields(line)) out.push_back(std::move(f.text));
  return out;
}

namespace detail {
namespace {

PointSet read_points(LineReader& lines, std::vector<std::size_t>* line_numbers) {
  const std::string& name = lines.file();
  constexpr std::array<std::string_view, 3> kAxes{"x", "y", "z"};
  std::optional<std::array<std::size_t, 3>> cols;  // field index of x, y, z
  std::size_t header_fields = 0;
  PointSet pts;
  std::string_view view;
  while (lines.next(view)) {
    const std::size_t line_no = lines.line_number();
    std::size_t first = 0;
    while (first < view.size() && detail::is_blank(view[first])) ++first;
    if (first == view.size() || view[first] == '#') continue;

    std::vector<detail::CsvField> fields;
    try {
      fields = detail::split_csv_fields(view);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{name, line_no, e.where().column}, "", e.what());
    }
    if (!cols) {
      std::array<std::size_t, 3> found{};
      for (std::size_t a = 0; a < 3; ++a) {
        bool seen = false;
        for (std::size_t k = 0; k < fields.size(); ++k) {
          const std::string& t = fields[k].text;
          if (t.size() > 1 && t.rfind(kAxes[a], 0) == 0 && t.find('[') != std::string::npos &&
              t.find_first_not_of(' ', 1) == t.find('['))
            throw InputError(SourceLocation{name, line_no, fields[k].column}, t,
                             fmt::format("a point list takes no units in its header; accepted: the column {} with values in metres",
                                         kAxes[a]));
          if (t != kAxes[a]) continue;
          if (seen)
            throw InputError(SourceLocation{name, line_no, fields[k].column}, std::string(kAxes[a]),
                             "the header names this column twice; accepted: each of x, y, z once");
          found[a] = k;
          seen = true;
        }
        if (!seen)
          throw InputError(SourceLocation{name, line_no, 1}, std::string(kAxes[a]),
                           fmt::format("the header row must name the columns x, y and z (in metres); found: {}", view));
      }
      cols = found;
      header_fields = fields.size();
      continue;
    }
    if (fields.size() != header_fields)
      throw InputError(SourceLocation{name, line_no, fields.size() > header_fields ? fields[header_fields].column : view.size() + 1}, "",
                       fmt::format("found {} fields; accepted: {}, as many as the header has", fields.size(), header_fields));
    if (pts.size() == kMaxPointRows)
      throw InputError(SourceLocation{name, line_no, 1}, "",
                       fmt::format("more than {} points; accepted: at most {} rows in one point list (split the file)",
                                   kMaxPointRows, kMaxPointRows));
    Vec3 p;
    for (std::size_t a = 0; a < 3; ++a) {
      const auto& f = fields[(*cols)[a]];
      double v = 0.0;
      const char* b = f.text.data();
      const char* e = b + f.text.size();
      if (b != e && *b == '+' && !(e - b > 1 && (b[1] == '-' || b[1] == '+'))) ++b;
      const auto [end, ec] = std::from_chars(b, e, v);
      if (f.text.empty() || ec != std::errc{} || end != e || !std::isfinite(v) || std::abs(v) > kMaxLengthM)
        throw InputError(SourceLocation{name, line_no, f.column}, std::string(kAxes[a]),
                         fmt::format("found \"{}\"; accepted: a number in metres up to {:g} in size", f.text, kMaxLengthM));
      p[static_cast<Eigen::Index>(a)] = v;
    }
    pts.push_back(p);
    if (line_numbers) line_numbers->push_back(line_no);
  }
  if (!cols)
    throw InputError(SourceLocation{name, 0, 0}, "",
                     "the file has no header row naming x, y, z (it is empty or all comments); accepted: a header row x,y,z, "
                     "then one point per row in metres");
  if (pts.size() == 0)
    throw InputError(SourceLocation{name, 0, 0}, "", "the file has a header but no data rows; accepted: one point per row after the header");
  return pts;
}

}  // namespace
}  // namespace detail

PointSet parse_points_csv(std::string_view text, std::string file) {
  LineReader lines(text, std::move(file));
  return detail::read_points(lines, nullptr);
}

PointSet read_points_csv(const std::filesystem::path& file, std::vector<std::size_t>* line_numbers) {
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(SourceLocation{file.string(), 0, 0}, "", "cannot open the points file");
  LineReader lines(in, file.string());
  return detail::read_points(lines, line_numbers);
}

}  // namespace coilwright
