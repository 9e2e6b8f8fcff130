// coilwright-mpi: the embarrassingly parallel jobs spread over MPI ranks (one per node, OpenMP
// inside). Every rank reads the same input; each runs its share (Monte Carlo builds and
// sensitivity evaluations [N r/P, N (r+1)/P), or starts s with s mod P = r); rank 0 gathers the
// results in index order and writes the same files as `coilwright`, so a run with any number of
// ranks gives the single-process result.
#include <mpi.h>

#include <chrono>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>
#include <fmt/format.h>

#include "coilwright/config.hpp"
#include "coilwright/error.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/parallel.hpp"
#include "coilwright/result_folder.hpp"
#include "coilwright/results.hpp"
#include "coilwright/search.hpp"
#include "coilwright/tolerance_report.hpp"

namespace {

using namespace coilwright;

struct World {
  int rank = 0, size = 1;
};

// BuildMetrics as 8 doubles for the wire.
constexpr int kBuildDoubles = 8;
void pack(const BuildMetrics& b, double* out) {
  out[0] = b.worst_relative_deviation;
  out[1] = b.worst_absolute_deviation_T;
  out[2] = b.rms_relative_deviation;
  out[3] = b.centre_field_T;
  out[4] = b.inhomogeneity;
  out[5] = b.good_field_radius_m;
  out[6] = b.meets_tolerance ? 1.0 : 0.0;
  out[7] = 0.0;
}
BuildMetrics unpack(const double* in) {
  BuildMetrics b;
  b.worst_relative_deviation = in[0];
  b.worst_absolute_deviation_T = in[1];
  b.rms_relative_deviation = in[2];
  b.centre_field_T = in[3];
  b.inhomogeneity = in[4];
  b.good_field_radius_m = in[5];
  b.meets_tolerance = in[6] > 0.5;
  return b;
}

std::uint64_t block_begin(std::uint64_t n, const World& w, int r) {
  return n * static_cast<std::uint64_t>(r) / static_cast<std::uint64_t>(w.size);
}

// Evaluations [0, n) split into one block per rank, run(begin, end) on each, gathered on rank 0
// in index order (empty elsewhere).
template <class Run>
std::vector<BuildMetrics> distributed(std::uint64_t n, const World& w, Run&& run) {
  const auto mine = run(block_begin(n, w, w.rank), block_begin(n, w, w.rank + 1));
  std::vector<double> send(mine.size() * kBuildDoubles);
  for (std::size_t i = 0; i < mine.size(); ++i) pack(mine[i], &send[i * kBuildDoubles]);
  std::vector<int> counts(static_cast<std::size_t>(w.size)), displs(static_cast<std::size_t>(w.size));
  for (int r = 0; r < w.size; ++r) {
    counts[static_cast<std::size_t>(r)] = static_cast<int>((block_begin(n, w, r + 1) - block_begin(n, w, r)) * kBuildDoubles);
    displs[static_cast<std::size_t>(r)] = static_cast<int>(block_begin(n, w, r) * kBuildDoubles);
  }
  std::vector<double> all(w.rank == 0 ? n * kBuildDoubles : 0);
  MPI_Gatherv(send.data(), static_cast<int>(send.size()), MPI_DOUBLE, all.data(), counts.data(), displs.data(), MPI_DOUBLE, 0,
              MPI_COMM_WORLD);
  std::vector<BuildMetrics> out;
  if (w.rank == 0)
    for (std::uint64_t i = 0; i < n; ++i) out.push_back(unpack(&all[i * kBuildDoubles]));
  return out;
}

void tolerance_job(const std::string& file, const ToleranceOptions& options, const std::string& out_dir, bool json,
                   const World& w) {
  using Clock = std::chrono::steady_clock;
  const Model design = design_for_tolerance(load_model(file));
  if (!design.tolerances.declared())
    throw InputError(SourceLocation{design.source_file}, "tolerance", "the design declares no tolerances");
  ToleranceStudy s;
  s.options = options;
  s.options.validate();
  const auto t0 = Clock::now();
  // The sensitivities' evaluations and the builds are both spread over the ranks.
  const auto jobs = distributed(sensitivity_jobs(design), w, [&](std::uint64_t b, std::uint64_t e) {
    return run_sensitivity_jobs(design, s.options, static_cast<std::size_t>(b), static_cast<std::size_t>(e));
  });
  if (w.rank == 0) {
    Evaluator ev(design);
    s.nominal = ev.metrics(design);
    s.sensitivity = sensitivities_from(design, s.options, jobs);
  }
  const auto t1 = Clock::now();
  s.builds = distributed(static_cast<std::uint64_t>(s.options.samples), w,
                         [&](std::uint64_t b, std::uint64_t e) { return run_builds(design, s.options, b, e); });
  const auto t2 = Clock::now();
  if (w.rank != 0) return;
  s.monte_carlo = summarise(s.builds, s.options.good_field);
  s.seconds_sensitivity = std::chrono::duration<double>(t1 - t0).count();
  s.seconds_monte_carlo = std::chrono::duration<double>(t2 - t1).count();
  const std::filesystem::path src(file);
  write_tolerance_files(out_dir.empty() ? src.parent_path() : std::filesystem::path(out_dir), src.stem().string(), s);
  if (json)
    fmt::print("{}\n", tolerance_json(s).dump(2));
  else
    fmt::print("{}", tolerance_text(design, s));
  fmt::print(stderr, "{} rank(s): {} builds in {:.3f} s ({:.1f} builds/s)\n", w.size, s.options.samples, s.seconds_monte_carlo,
             s.seconds_monte_carlo > 0 ? s.options.samples / s.seconds_monte_carlo : 0.0);
}

// The search's starts spread over ranks; every rank learns every start's result.
void design_job(const std::string& file, const std::string& out_dir, const World& w) {
  const Model config = load_model(file);
  SearchHooks hooks;
  hooks.runs_start = [w](std::size_t s) { return static_cast<int>(s % static_cast<std::size_t>(w.size)) == w.rank; };
  hooks.exchange = [w](std::vector<std::vector<double>>& local_x, std::vector<std::vector<double>>& polished_x,
                       std::vector<char>& ran) {
    // Each start's owner broadcasts [ran, |local|, |polished|, local..., polished...].
    for (std::size_t s = 0; s < ran.size(); ++s) {
      const int owner = static_cast<int>(s % static_cast<std::size_t>(w.size));
      std::vector<double> msg;
      if (owner == w.rank) {
        msg = {static_cast<double>(ran[s]), static_cast<double>(local_x[s].size()), static_cast<double>(polished_x[s].size())};
        msg.insert(msg.end(), local_x[s].begin(), local_x[s].end());
        msg.insert(msg.end(), polished_x[s].begin(), polished_x[s].end());
      }
      int len = static_cast<int>(msg.size());
      MPI_Bcast(&len, 1, MPI_INT, owner, MPI_COMM_WORLD);
      msg.resize(static_cast<std::size_t>(len));
      MPI_Bcast(msg.data(), len, MPI_DOUBLE, owner, MPI_COMM_WORLD);
      if (owner == w.rank) continue;
      ran[s] = msg[0] > 0.5 ? 1 : 0;
      const auto nl = static_cast<std::size_t>(msg[1]), np = static_cast<std::size_t>(msg[2]);
      local_x[s].assign(msg.begin() + 3, msg.begin() + 3 + static_cast<std::ptrdiff_t>(nl));
      polished_x[s].assign(msg.begin() + 3 + static_cast<std::ptrdiff_t>(nl),
                           msg.begin() + 3 + static_cast<std::ptrdiff_t>(nl + np));
    }
  };
  const SearchSummary summary = run_search(config, hooks);
  if (w.rank != 0) return;
  const std::filesystem::path out = out_dir.empty() ? std::filesystem::path("results") / safe_folder_name(config.project.name)
                                                    : std::filesystem::path(out_dir);
  publish_results(out, config, summary);
  fmt::print(stderr, "{} rank(s): {}\nwritten to {}\n", w.size, summary.one_line(), out.string());
}

}  // namespace

int main(int argc, char** argv) {
  int provided = 0;
  MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
  World w;
  MPI_Comm_rank(MPI_COMM_WORLD, &w.rank);
  MPI_Comm_size(MPI_COMM_WORLD, &w.size);
  CLI::App app{"coilwright-mpi: Monte Carlo tolerance studies and design searches over MPI ranks (OpenMP inside each)."};
  app.footer("Example:\n  mpirun -np 2 coilwright-mpi tolerance design-01.toml --samples 10000 --seed 1\n"
             "Results equal a single-process `coilwright` run with the same seed. Exit codes as coilwright.");
  app.require_subcommand(1);
  int threads = 0;
  app.add_option("--threads", threads, "Worker threads per rank (default: all cores)")->check(CLI::NonNegativeNumber);
  std::string file, out;
  bool json = false;
  ToleranceOptions options;
  auto* tol = app.add_subcommand("tolerance", "Sensitivities (rank 0) and Monte Carlo builds (all ranks)");
  tol->add_option("design", file, "Design file (TOML)")->required()->check(CLI::ExistingFile);
  tol->add_option("--samples", options.samples, "Monte Carlo builds")->check(CLI::NonNegativeNumber);
  tol->add_option("--seed", options.seed, "Seed of the builds");
  tol->add_flag("--trim", options.trim, "Re-solve the circuit currents on each build");
  tol->add_flag("--good-field", options.good_field, "Also find each build's good-field radius");
  tol->add_flag("--json", json, "Print JSON");
  tol->add_option("--out", out, "Output folder (default: the design's folder)");
  auto* des = app.add_subcommand("design", "The design search with its starts spread over ranks");
  des->add_option("config", file, "Config file (TOML)")->required()->check(CLI::ExistingFile);
  des->add_option("--out", out, "Output folder (default: results/<project name>)");
  int code = exit_code::ok;
  try {
    app.parse(argc, argv);
    set_threads(threads);
    if (tol->parsed()) tolerance_job(file, options, out, json, w);
    if (des->parsed()) design_job(file, out, w);
  } catch (const CLI::ParseError& e) {
    code = w.rank == 0 ? app.exit(e) : 0;
    if (code != 0) code = exit_code::bad_input;
  } catch (const InputError& e) {
    if (w.rank == 0) fmt::print(stderr, "error: {}\n", e.what());
    code = exit_code::bad_input;
  } catch (const DomainError& e) {
    if (w.rank == 0) fmt::print(stderr, "error: {}\n", e.what());
    code = exit_code::bad_input;
  } catch (const OutputError& e) {
    fmt::print(stderr, "error: {}\n", e.what());
    code = exit_code::output;
  } catch (const std::exception& e) {
    fmt::print(stderr, "internal error: {}\n", e.what());
    MPI_Abort(MPI_COMM_WORLD, exit_code::internal);
  }
  MPI_Finalize();
  return code;
}
