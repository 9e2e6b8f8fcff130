#include "coilwright/search.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <mutex>
#include <random>

#include <fmt/format.h>
#include <nlopt.hpp>

#include "coilwright/error.hpp"
#include "coilwright/parallel.hpp"
#include "coilwright/tolerance.hpp"

namespace coilwright {

namespace {

using Clock = std::chrono::steady_clock;

constexpr double kXtolRel = 1e-10;    // local stop: parameter change below 1e-10 of the unit box
constexpr double kFtolAbs = 1e-16;    // local stop: objective change below 1e-16 (relative deviations)
constexpr double kDistinct = 0.02;    // optima closer than this (max norm, unit box) are the same design

nlopt::algorithm local_algorithm(const std::string& name, std::size_t n, Objective objective) {
  // The worst deviation is a maximum over points: not smooth where the worst point changes.
  // Subplex copes with that far better than a quadratic model (measured on the bundled rig:
  // 3.3e-5 against 7.2e-5 for BOBYQA); smooth objectives suit BOBYQA.
  if (name == "auto") return objective == Objective::worst ? nlopt::LN_SBPLX : local_algorithm("bobyqa", n, objective);
  if (name == "cobyla") return nlopt::LN_COBYLA;
  if (name == "neldermead") return nlopt::LN_NELDERMEAD;
  if (name == "sbplx") return nlopt::LN_SBPLX;
  // BOBYQA's quadratic model needs at least two variables.
  return n >= 2 ? nlopt::LN_BOBYQA : nlopt::LN_SBPLX;
}

// Shared state of one search: budgets, the stop flag, the progress report.
struct Budget {
  Budget(long max_eval, double max_s, const SearchHooks& h)
      : max_evaluations(max_eval), max_seconds(max_s), t0(Clock::now()), hooks(&h), last_progress(t0) {}
  long max_evaluations;
  double max_seconds;
  Clock::time_point t0;
  const SearchHooks* hooks;
  std::atomic<long> evaluations{0};
  std::atomic<bool> out_of_evaluations{false}, out_of_time{false}, interrupted{false};
  std::mutex progress_mutex;
  Clock::time_point last_progress;
  double best = std::numeric_limits<double>::infinity();

  // The evaluation budget is split between the starts in advance (NLopt's maxeval per start), so
  // the outcome does not depend on which thread runs which start; only the clock and a signal
  // stop a run from outside, and those are the documented sources of non-reproducibility.
  bool should_stop() {
    if (hooks->stop && hooks->stop->load()) interrupted = true;
    if (std::chrono::duration<double>(Clock::now() - t0).count() > max_seconds) out_of_time = true;
    return interrupted || out_of_time;
  }
  void report(double value) {
    std::lock_guard lock(progress_mutex);
    best = std::min(best, value);
    const auto now = Clock::now();
    if (hooks->progress && now - last_progress > std::chrono::milliseconds(250)) {
      last_progress = now;
      hooks->progress(evaluations.load(), max_evaluations, best);
    }
  }
};

// One local optimisation from a start point, with its own evaluator (caches are per thread).
struct LocalRun {
  LocalRun(const ParameterSpace& s, Evaluator& e, const Model& m, Objective o, Budget& b)
      : space(&s), evaluator(&e), model(m), objective(o), budget(&b), frozen(s.size(), false) {}
  const ParameterSpace* space;
  Evaluator* evaluator;
  Model model;
  Objective objective;
  Budget* budget;
  bool round_integers = false;
  std::vector<bool> frozen;  // parameters held at their start value
  std::vector<double> base;  // full unit vector; free entries are overwritten
  std::vector<double> best_x;
  double best = std::numeric_limits<double>::infinity();
  nlopt::opt* opt = nullptr;

  std::vector<double> x;      // the full unit vector being evaluated (kept: no allocation per evaluation)

  double evaluate(const std::vector<double>& free_x) {
    x = base;
    for (std::size_t i = 0, k = 0; i < x.size(); ++i)
      if (!frozen[i]) x[i] = free_x[k++];
    space->apply(model, x, round_integers);
    const double f = evaluator->objective(model, objective);
    if (++budget->evaluations >= budget->max_evaluations) budget->out_of_evaluations = true;
    if (f < best) best = f, best_x = x;
    budget->report(f);
    if (budget->should_stop() && opt) opt->force_stop();
    return std::isfinite(f) ? f : 1e300;
  }

  static double trampoline(const std::vector<double>& x, std::vector<double>&, void* self) {
    return static_cast<LocalRun*>(self)->evaluate(x);
  }

  // Minimise over the non-frozen parameters from `x0`; returns the best full unit vector.
  std::vector<double> run(const std::vector<double>& x0, const std::string& algorithm, long max_eval) {
    base = x0;
    best_x = x0;
    std::vector<double> free_x;
    for (std::size_t i = 0; i < x0.size(); ++i)
      if (!frozen[i]) free_x.push_back(x0[i]);
    if (free_x.empty()) {
      evaluate(free_x);
      return best_x;
    }
    nlopt::opt o(local_algorithm(algorithm, free_x.size(), objective), static_cast<unsigned>(free_x.size()));
    opt = &o;
    o.set_lower_bounds(std::vector<double>(free_x.size(), 0.0));
    o.set_upper_bounds(std::vector<double>(free_x.size(), 1.0));
    o.set_min_objective(&LocalRun::trampoline, this);
    o.set_xtol_rel(kXtolRel);
    o.set_ftol_abs(kFtolAbs);
    o.set_initial_step(std::vector<double>(free_x.size(), 0.05));
    o.set_maxeval(static_cast<int>(std::max<long>(10, max_eval)));
    double f = 0.0;
    try {
      o.optimize(free_x, f);
    } catch (const nlopt::forced_stop&) {
    } catch (const nlopt::roundoff_limited&) {
    } catch (const std::runtime_error&) {
      // NLopt reports a failed local run as runtime_error; the best point so far stands.
    }
    opt = nullptr;
    return best_x;
  }
};

nlopt::algorithm global_algorithm(const std::string& name) {
  if (name == "direct") return nlopt::GN_DIRECT_L;
  if (name == "crs") return nlopt::GN_CRS2_LM;
  if (name == "isres") return nlopt::GN_ISRES;
  return nlopt::GN_MLSL_LDS;
}

// Start points: the config's start, then seeded random points (reproducible for a seed).
std::vector<std::vector<double>> start_points(const ParameterSpace& space, int starts, unsigned seed) {
  std::vector<std::vector<double>> out{space.start()};
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int s = 1; s < starts; ++s) {
    std::vector<double> x(space.size());
    for (double& v : x) v = u(rng);
    out.push_back(std::move(x));
  }
  return out;
}

double total_turns(const Model& m) {
  double n = 0.0;
  for (const Coil& c : m.coils) n += (c.is_pair() ? 2.0 : 1.0) * c.turns;
  return n;
}

// Feasible first; then the objective; among equal objectives (a solved current makes the turns
// of its windings irrelevant to the field) fewer ampere-turns, then fewer turns (less wire).
bool better(const Design& a, const Design& b) {
  if (a.constraints.feasible() != b.constraints.feasible()) return a.constraints.feasible();
  if (std::abs(a.objective - b.objective) > 1e-9 * std::max(std::abs(a.objective), std::abs(b.objective)))
    return a.objective < b.objective;
  const double at_a = ampere_turns(a.model), at_b = ampere_turns(b.model);
  if (std::abs(at_a - at_b) > 1e-9 * std::max(at_a, at_b)) return at_a < at_b;
  return total_turns(a.model) < total_turns(b.model);
}

// Re-ranks designs by yield under the declared tolerances (feasible first, then yield, then the
// previous order). Builds are seeded by the search seed, so the ranking is reproducible.
void rank_by_yield(std::vector<Design>& designs, const SearchOptions& opts) {
  ToleranceOptions t;
  t.samples = opts.yield_samples;
  t.seed = opts.seed;
  for (Design& d : designs) {
    const MonteCarloSummary mc = summarise(run_builds(d.model, t, 0, static_cast<std::uint64_t>(t.samples)), false);
    d.yield = mc.yield;
    d.yield_standard_error = mc.yield_standard_error;
  }
  std::stable_sort(designs.begin(), designs.end(), [](const Design& a, const Design& b) {
    if (a.constraints.feasible() != b.constraints.feasible()) return a.constraints.feasible();
    return *a.yield > *b.yield;
  });
}

}  // namespace

std::string_view to_string(StopReason r) noexcept {
  switch (r) {
    case StopReason::converged: return "converged";
    case StopReason::evaluation_budget: return "evaluation budget used";
    case StopReason::time_budget: return "time budget used";
    case StopReason::interrupted: return "interrupted";
  }
  return "?";
}

std::string SearchSummary::one_line() const {
  return fmt::format("{} design(s); {}; {} evaluations in {:.2f} s (+{:.2f} s rounding, {:.2f} s metrics)", designs.size(),
                     to_string(reason), evaluations, seconds_search, seconds_polish, seconds_metrics);
}

ParameterSpace::ParameterSpace(const Model& model) : params_(model.free_parameters) {
  for (std::size_t i = 0; i < params_.size(); ++i)
    if (!params_[i].same_as) searched_.push_back(i);
}

bool ParameterSpace::is_integer(std::size_t i) const { return params_[searched_[i]].integer; }

void ParameterSpace::apply(Model& model, const std::vector<double>& x, bool round_integers) const {
  for (std::size_t i = 0; i < searched_.size(); ++i) {
    const FreeParameter& p = params_[searched_[i]];
    double v = p.min + std::clamp(x[i], 0.0, 1.0) * (p.max - p.min);
    if (p.integer && round_integers) v = std::clamp(std::round(v), std::ceil(p.min), std::floor(p.max));
    set(model.coils[p.coil], p.key, v);
  }
  for (const FreeParameter& p : params_)
    if (p.same_as) set(model.coils[p.coil], p.key, get(model.coils[params_[*p.same_as].coil], params_[*p.same_as].key));
}

std::vector<double> ParameterSpace::start() const {
  std::vector<double> x;
  for (std::size_t i : searched_) {
    const FreeParameter& p = params_[i];
    x.push_back((p.start - p.min) / (p.max - p.min));
  }
  return x;
}

std::vector<double> ParameterSpace::to_unit(const Model& model) const {
  std::vector<double> x;
  for (std::size_t i : searched_) {
    const FreeParameter& p = params_[i];
    x.push_back((get(model.coils[p.coil], p.key) - p.min) / (p.max - p.min));
  }
  return x;
}

SearchSummary run_search(const Model& model, const SearchHooks& hooks) {
  const SearchOptions& opts = model.search;
  const ParameterSpace space(model);
  // Samples the target and validates it before any work; every start copies it (the samples
  // and what they ask of the field) rather than sampling again, and fills its own caches.
  const Evaluator probe(model);
  Budget budget(opts.max_evaluations, opts.max_time_s, hooks);

  const bool global_nlopt = opts.global_algorithm != "multistart" && opts.global_algorithm != "none";
  const int starts = opts.global_algorithm == "none" || space.size() == 0 ? 1 : std::max(1, opts.starts);
  auto points = start_points(space, starts, opts.seed);
  const long per_start = std::max<long>(20, opts.max_evaluations / (starts + (global_nlopt ? 1 : 0)));

  // Global stage with an NLopt algorithm: its best point joins the starts for polishing.
  if (global_nlopt && space.size() > 0) {
    Evaluator ev(probe);
    LocalRun g(space, ev, model, opts.objective, budget);
    nlopt::opt o(global_algorithm(opts.global_algorithm), static_cast<unsigned>(space.size()));
    g.opt = &o;
    g.base = points.front();
    o.set_lower_bounds(std::vector<double>(space.size(), 0.0));
    o.set_upper_bounds(std::vector<double>(space.size(), 1.0));
    o.set_min_objective(&LocalRun::trampoline, &g);
    o.set_maxeval(static_cast<int>(per_start));
    nlopt::srand(opts.seed);
    if (opts.global_algorithm == "mlsl") {
      nlopt::opt local(local_algorithm(opts.local_algorithm, space.size(), opts.objective), static_cast<unsigned>(space.size()));
      local.set_xtol_rel(1e-6);
      o.set_local_optimizer(local);
    }
    std::vector<double> x = points.front();
    double f = 0.0;
    try {
      o.optimize(x, f);
    } catch (const std::exception&) {
    }
    points.push_back(g.best_x);
  }

  // Local polishing from every start, in parallel; results are stored by start index so the
  // outcome does not depend on the number of threads.
  std::vector<Design> found(points.size());
  std::vector<char> ran(points.size(), 0);
  std::vector<std::vector<double>> local_x(points.size()), polished_x(points.size());  // for a distributed run
  const bool inner_parallel = points.size() == 1;
#ifdef COILWRIGHT_HAVE_OPENMP
#pragma omp parallel for schedule(dynamic, 1) if (!inner_parallel)
#endif
  for (std::size_t s = 0; s < points.size(); ++s) {
    if (budget.should_stop() && s > 0) continue;
    if (hooks.runs_start && !hooks.runs_start(s)) continue;
    Evaluator ev(probe);
    LocalRun run(space, ev, model, opts.objective, budget);
    const auto x = run.run(points[s], opts.local_algorithm, per_start);
    Design d;
    d.model = model;
    space.apply(d.model, x, false);
    d.objective_unrounded = ev.objective(d.model, opts.objective);
    // Integer turns: round, then re-polish the continuous parameters with the integers frozen.
    bool has_integer = false;
    for (std::size_t i = 0; i < space.size(); ++i) has_integer |= space.is_integer(i);
    if (has_integer) {
      LocalRun polish(space, ev, model, opts.objective, budget);
      polish.round_integers = true;
      for (std::size_t i = 0; i < space.size(); ++i) polish.frozen[i] = space.is_integer(i);
      const auto xr = polish.run(x, opts.local_algorithm, per_start / 2 + 20);
      space.apply(d.model, xr, true);
      polished_x[s] = xr;
    }
    local_x[s] = x;
    d.objective = ev.objective(d.model, opts.objective, &d.constraints);
    d.start = static_cast<int>(s);
    found[s] = std::move(d);
    ran[s] = 1;
  }
  (void)inner_parallel;  // used only by the OpenMP pragma
  if (hooks.exchange) {
    // Rebuild the designs of starts run elsewhere, by the same steps as above.
    const std::vector<char> ran_here = ran;
    hooks.exchange(local_x, polished_x, ran);
    Evaluator ev(probe);
    for (std::size_t s = 0; s < points.size(); ++s) {
      if (!ran[s] || ran_here[s]) continue;
      Design d;
      d.model = model;
      space.apply(d.model, local_x[s], false);
      d.objective_unrounded = ev.objective(d.model, opts.objective);
      if (!polished_x[s].empty()) space.apply(d.model, polished_x[s], true);
      d.objective = ev.objective(d.model, opts.objective, &d.constraints);
      d.start = static_cast<int>(s);
      found[s] = std::move(d);
    }
  }

  SearchSummary summary;
  summary.seconds_search = std::chrono::duration<double>(Clock::now() - budget.t0).count();
  std::vector<Design> results;
  for (std::size_t s = 0; s < found.size(); ++s)
    if (ran[s]) results.push_back(std::move(found[s]));
  std::stable_sort(results.begin(), results.end(), better);

  // Keep distinct optima only.
  const auto t_metrics = Clock::now();
  std::vector<std::vector<double>> kept_x;
  std::vector<double> kept_objective;
  Evaluator ev(probe);
  for (Design& d : results) {
    if (static_cast<int>(summary.designs.size()) >= opts.designs) break;
    // The same design when the continuous parameters agree; turns alone do not make a design
    // distinct when the objective is unchanged (a solved current absorbs them).
    const auto x = space.to_unit(d.model);
    bool seen = false;
    for (std::size_t k = 0; k < kept_x.size(); ++k) {
      double dist = 0.0, dist_continuous = 0.0;
      for (std::size_t i = 0; i < x.size(); ++i) {
        dist = std::max(dist, std::abs(x[i] - kept_x[k][i]));
        if (!space.is_integer(i)) dist_continuous = std::max(dist_continuous, std::abs(x[i] - kept_x[k][i]));
      }
      const bool same_objective = std::abs(d.objective - kept_objective[k]) <= 1e-9 * std::abs(kept_objective[k]);
      seen |= dist < kDistinct || (dist_continuous < kDistinct && same_objective);
    }
    if (seen) continue;
    kept_x.push_back(x);
    kept_objective.push_back(d.objective);
    d.model.free_parameters.clear();
    for (Circuit& c : d.model.circuits) {
      if (c.solved) c.solved = false;
    }
    d.metrics = ev.metrics(d.model);
    summary.designs.push_back(std::move(d));
  }
  // Tolerance-aware ranking: the fraction of seeded Monte Carlo builds that meet the target.
  if (opts.rank_by == RankBy::yield && model.tolerances.declared()) rank_by_yield(summary.designs, opts);
  summary.seconds_metrics = std::chrono::duration<double>(Clock::now() - t_metrics).count();
  summary.evaluations = budget.evaluations.load();
  summary.coil_evaluations = ev.coil_evaluations();
  summary.reason = budget.interrupted          ? StopReason::interrupted
                   : budget.out_of_time        ? StopReason::time_budget
                   : budget.out_of_evaluations ? StopReason::evaluation_budget
                                               : StopReason::converged;
  summary.message = fmt::format("{} start(s), {} distinct design(s) kept", points.size(), summary.designs.size());
  return summary;
}

}  // namespace coilwright
