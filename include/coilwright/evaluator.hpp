#pragma once
// Evaluates designs on a target: solves the free currents, measures the field and checks the
// constraints. One Evaluator per search: it samples the region once and caches each coil's
// response, so that a new geometry costs only the coils that moved.
#include <memory>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "coilwright/metrics.hpp"
#include "coilwright/model.hpp"
#include "coilwright/response.hpp"
#include "coilwright/sampling.hpp"

namespace coilwright {

struct ConstraintReport {
  double violation = 0.0;            // sum of relative violations; 0 when feasible
  std::vector<std::string> broken;   // one line per broken constraint
  [[nodiscard]] bool feasible() const { return violation <= 0.0; }
};

class Evaluator {
 public:
  // Samples the model's target (throws InputError without one or when its goal has no scale).
  explicit Evaluator(const Model& model);

  // Solves the currents of `model`'s solved circuits for its geometry (writing them into
  // model.circuits) and returns the search objective: smaller is better, and any design that
  // breaks a constraint scores above every design that does not.
  double objective(Model& model, Objective objective, ConstraintReport* report = nullptr);

  // The full metrics of a design with its currents as they stand.
  [[nodiscard]] Metrics metrics(const Model& model);
  // The constraints of the search options, checked for a design with its currents.
  [[nodiscard]] ConstraintReport constraints(const Model& model) const;

  [[nodiscard]] const SampleSet& samples() const noexcept { return samples_; }
  [[nodiscard]] const GoalSpec& goal() const noexcept { return goal_; }
  // Indices n of the on-axis terms the "order" objective drives to zero for this model.
  [[nodiscard]] const std::vector<int>& nulled_terms() const noexcept { return nulled_terms_; }
  [[nodiscard]] std::size_t coil_evaluations() const noexcept;

 private:
  void solve_currents(Model& model, const ResponseMatrix& A, const PointSet& pts, const std::vector<double>* weights);
  double order_objective(Model& model);
  void choose_nulled_terms(const Model& model);

  GoalSpec goal_;
  SampleSet samples_;
  ResponseCache boundary_;
  ResponseCache volume_;
  std::vector<int> nulled_terms_;
  bool nulled_terms_chosen_ = false;
};

// Field of the model (coils plus ambient) at points, from a response matrix and the currents.
[[nodiscard]] std::vector<Vec3> total_field(const Model& model, const ResponseMatrix& A, const PointSet& pts,
                                            const GoalSpec& goal);
[[nodiscard]] Eigen::VectorXd currents_of(const Model& model);
[[nodiscard]] double ampere_turns(const Model& model);

}  // namespace coilwright
