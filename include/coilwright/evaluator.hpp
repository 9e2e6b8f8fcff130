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
  // What a sample set asks of the coils' field, fixed for the Evaluator's life: the goal less
  // the ambient field at each sample (3n rows [x; y; z], or n of B·a for a gradient goal).
  struct SampleGoal {
    Eigen::VectorXd want;         // [T]
    Eigen::VectorXd weight;       // per sample (volume fraction); empty when unweighted
    Eigen::VectorXd sqrt_weight;  // its square root, which weights the least-squares rows
    Eigen::VectorXd rhs;          // want, rows weighted: the least-squares right-hand side
    double rhs_norm = 0.0;        // |rhs|
  };
  // Per-evaluation scratch, sized by the first evaluation. An Evaluator serves one search start
  // (one thread at a time), so reusing it needs no lock and an evaluation allocates nothing.
  struct Workspace {
    std::vector<Eigen::Index> solved;  // circuits whose currents are solved
    Eigen::VectorXd rhs;               // the right-hand side less the fixed circuits' field
    Eigen::VectorXd lo, hi;            // bounds of the solved currents [A]
    Eigen::MatrixXd columns;           // weighted (or projected) solved columns, when not A's own
    Eigen::VectorXd currents;          // [A], every circuit
    Eigen::VectorXd field;             // A · currents [T]
  };

  SampleGoal sample_goal(const PointSet& pts, const std::vector<double>* weights) const;
  void solve_currents(Model& model, const ResponseMatrix& A, const SampleGoal& g);
  // max_i |ΔB_i| (weights == false) or sum_i w_i |ΔB_i|^2 over a sample set, in tesla (squared).
  double deviation_sum(const Model& model, const ResponseMatrix& A, const SampleGoal& g, bool weighted);
  double order_objective(Model& model);
  void choose_nulled_terms(const Model& model);

  GoalSpec goal_;
  SampleSet samples_;
  ResponseCache boundary_;
  ResponseCache volume_;
  SampleGoal boundary_goal_;
  SampleGoal volume_goal_;
  // The coils' and goal's own symmetry, which the samples drop for regions without it (points,
  // box, plane) but the good-field sphere and cylinder of the metrics still have.
  Symmetry field_symmetry_;
  Workspace work_;
  std::vector<int> nulled_terms_;
  bool nulled_terms_chosen_ = false;
};

// Field of the model (coils plus ambient) at points, from a response matrix and the currents.
[[nodiscard]] std::vector<Vec3> total_field(const Model& model, const ResponseMatrix& A, const PointSet& pts,
                                            const GoalSpec& goal);
[[nodiscard]] Eigen::VectorXd currents_of(const Model& model);
[[nodiscard]] double ampere_turns(const Model& model);

}  // namespace coilwright
