// coilwright field: the field of a design at given points, or a summary at the origin.
#include <string>
#include <vector>

#include <fmt/format.h>

#include "commands.hpp"
#include "display.hpp"
#include "coilwright/atomic_file.hpp"
#include "coilwright/config.hpp"
#include "coilwright/csv.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/model.hpp"

namespace coilwright::cli {

namespace {

struct FieldArgs {
  std::string design;
  std::string points;
  std::string out;
};

void print_summary(const Model& model) {
  PointSet origin;
  origin.push_back(Vec3::Zero());
  check_clear_of_windings(model.coils, origin);
  const Vec3 b = field_of_model(model, origin)[0];
  fmt::print("{}: {} coil(s) on {} circuit(s)\n", model.source_file, model.coils.size(), model.circuits.size());
  fmt::print("field at the origin: Bx = {}, By = {}, Bz = {}\n", with_prefix(b.x(), "T"), with_prefix(b.y(), "T"),
             with_prefix(b.z(), "T"));
  fmt::print("|B| = {}\n", with_prefix(b.norm(), "T"));
  fmt::print("field per ampere at the origin, by circuit:\n");
  for (std::size_t c = 0; c < model.circuits.size(); ++c) {
    const Vec3 k = field_per_ampere(model, c, origin)[0];
    fmt::print("  {:<16} {:>10}  [{}, {}, {}] T/A\n", model.circuits[c].name, with_prefix(model.circuits[c].current_A, "A"),
               fmt::format("{:.6e}", k.x()), fmt::format("{:.6e}", k.y()), fmt::format("{:.6e}", k.z()));
  }
}

void write_points(const Model& model, const FieldArgs& args) {
  std::vector<std::size_t> lines;
  const PointSet pts = read_points_csv(args.points, &lines);
  try {
    check_clear_of_windings(model.coils, pts);
  } catch (const DomainError&) {
    // Name the line of the first such point: the check itself knows points, not files.
    for (std::size_t i = 0; i < pts.size(); ++i) {
      PointSet one;
      one.push_back(pts[i]);
      try {
        check_clear_of_windings(model.coils, one);
      } catch (const DomainError& e) {
        throw InputError(SourceLocation{args.points, lines[i], 1}, "",
                         fmt::format("{}; accepted: points outside every winding", e.what()));
      }
    }
    throw;
  }
  const FieldSet b = field_of_model(model, pts);
  std::string csv = "x,y,z,Bx,By,Bz\n";
  csv.reserve(csv.size() + pts.size() * 6 * 25);
  for (std::size_t i = 0; i < pts.size(); ++i)
    fmt::format_to(std::back_inserter(csv), "{:.17g},{:.17g},{:.17g},{:.17g},{:.17g},{:.17g}\n", pts.x[i], pts.y[i],
                   pts.z[i], b.bx[i], b.by[i], b.bz[i]);
  write_file_atomic(args.out, csv);
}

}  // namespace

void add_field_command(CLI::App& app, const GlobalOptions& global) {
  auto args = std::make_shared<FieldArgs>();
  auto* cmd = app.add_subcommand("field", "Field of a design at points from a CSV, or a summary at the origin");
  cmd->footer(
      "Example:\n  coilwright field configs/helmholtz-loops.toml\n"
      "  coilwright field design.toml --points grid.csv --out field.csv\n"
      "Input CSV: a header naming x,y,z (metres; other columns ignored). Output: x,y,z,Bx,By,Bz in tesla, 17 digits.");
  cmd->add_option("design", args->design, "Design or config file (TOML)")->required()->check(CLI::ExistingFile);
  auto* points = cmd->add_option("--points", args->points, "CSV of points (header with x,y,z in metres)")->check(CLI::ExistingFile);
  cmd->add_option("--out", args->out, "Where to write the field CSV")->needs(points);
  points->needs(cmd->get_option("--out"));
  cmd->callback([args, &global] {
    (void)global;
    const Model model = load_model(args->design);
    if (args->points.empty())
      print_summary(model);
    else
      write_points(model, *args);
  });
}

}  // namespace coilwright::cli
