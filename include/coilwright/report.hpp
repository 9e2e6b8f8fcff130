#pragma once
// The report of a design run: one self-contained HTML file (figures inline as SVG, no network,
// no scripts) built from the written results — design-NN.toml reloaded as models and
// summary.json — so `coilwright report <dir>` and `coilwright design` give the same page.
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json_fwd.hpp>

#include "coilwright/figures.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

// What the report was built from and what it wrote.
struct ReportSummary {
  std::filesystem::path report;               // report.html
  std::vector<std::filesystem::path> figures;  // figures/*.svg
  std::size_t designs = 0;
};

// Text made safe for HTML element content and attribute values (& < > " ').
[[nodiscard]] std::string html_escape(std::string_view text);

// The page for a run: `summary` as written in summary.json, `designs` in rank order (design-01
// first), `figures[r]` the figures of design r, `comparison` the comparison figure (may be empty).
[[nodiscard]] std::string report_html(const nlohmann::json& summary, const std::vector<Model>& designs,
                                      const std::vector<std::vector<Figure>>& figures, const Figure* comparison);

// Reads `dir`/summary.json and the design files it lists, draws every figure into
// `dir`/figures/ and writes `dir`/report.html, all atomically. Throws InputError when the
// folder has no readable results, OutputError when writing fails.
ReportSummary write_report(const std::filesystem::path& dir, const FigureOptions& options = {});

}  // namespace coilwright
