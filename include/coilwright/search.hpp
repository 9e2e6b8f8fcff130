#pragma once
// The design search: NLopt varies the free geometry (and turns) of a model; for each geometry
// the free currents come from a bounded least-squares solve (variable projection: G. H. Golub
// and V. Pereyra, SIAM J. Numer. Anal. 10, 413 (1973)). A multi-start global stage is followed
// by local polishing; turns are rounded and the rest re-polished; distinct optima are ranked.
#include <atomic>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "coilwright/evaluator.hpp"
#include "coilwright/metrics.hpp"
#include "coilwright/model.hpp"

namespace coilwright {

// One finished design: the model with every free parameter and current fixed.
struct Design {
  Model model;
  Metrics metrics;
  double objective = 0.0;          // the search objective (penalised if infeasible)
  double objective_unrounded = 0.0;  // before integer turns were rounded
  ConstraintReport constraints;
  int start = 0;                   // which start found it
  std::optional<double> yield;     // fraction of Monte Carlo builds meeting the target ([search] rank_by = "yield")
  std::optional<double> yield_standard_error;
  [[nodiscard]] double rounding_cost() const { return objective - objective_unrounded; }
};

enum class StopReason { converged, evaluation_budget, time_budget, interrupted };
[[nodiscard]] std::string_view to_string(StopReason r) noexcept;

struct SearchSummary {
  std::vector<Design> designs;  // ranked: feasible first, then by objective, then by ampere-turns
  StopReason reason = StopReason::converged;
  std::string message;
  long evaluations = 0;
  std::size_t coil_evaluations = 0;
  double seconds_search = 0.0;
  double seconds_polish = 0.0;   // rounding and re-polishing
  double seconds_metrics = 0.0;
  [[nodiscard]] std::string one_line() const;
};

struct SearchHooks {
  // Called now and then with (evaluations so far, evaluation budget, best objective so far).
  std::function<void(long, long, double)> progress;
  // Set from outside (e.g. a signal handler) to stop early and keep the best found so far.
  const std::atomic<bool>* stop = nullptr;
  // Distributed searches (MPI): whether this process runs start s (every start when unset), and
  // an exchange that fills in, for the starts other processes ran, their final unit vectors
  // (the local optimum, then the re-polished one with integers rounded) and sets ran[s].
  // Designs are rebuilt from those vectors exactly as a single process builds them.
  std::function<bool(std::size_t)> runs_start;
  std::function<void(std::vector<std::vector<double>>& local_x, std::vector<std::vector<double>>& polished_x,
                     std::vector<char>& ran)>
      exchange;
};

// The searched parameters of a model, mapped to the unit box for the optimiser.
class ParameterSpace {
 public:
  explicit ParameterSpace(const Model& model);
  [[nodiscard]] std::size_t size() const noexcept { return searched_.size(); }
  // Writes x (in [0,1]^n) into the model; ties follow their leaders; integers are rounded when asked.
  void apply(Model& model, const std::vector<double>& x, bool round_integers) const;
  [[nodiscard]] std::vector<double> start() const;
  [[nodiscard]] bool is_integer(std::size_t i) const;
  [[nodiscard]] std::vector<double> to_unit(const Model& model) const;

 private:
  std::vector<std::size_t> searched_;  // indices into model.free_parameters
  std::vector<FreeParameter> params_;
};

[[nodiscard]] SearchSummary run_search(const Model& model, const SearchHooks& hooks = {});

}  // namespace coilwright
