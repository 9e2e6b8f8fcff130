#pragma once
// The parsed project: circuits, coils, free parameters, the target region and the search
// options, as plain structs. The config reader fills it once; everything else only reads it.
#include <map>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "coilwright/coil.hpp"
#include "coilwright/error.hpp"
#include "coilwright/geometry.hpp"
#include "coilwright/hardware_options.hpp"
#include "coilwright/map_request.hpp"
#include "coilwright/tolerance_spec.hpp"

namespace coilwright {

// An independently driven circuit. With `solved`, its current is chosen by the least-squares
// solve within [min_current_A, max_current_A]; otherwise it is fixed at current_A.
struct Circuit {
  Circuit() = default;
  // A fixed-current circuit (the common case in code and tests).
  explicit Circuit(std::string name_, double current = 0.0) : name(std::move(name_)), current_A(current) {}
  std::string name;
  double current_A = 0.0;  // fixed value, or the solved value once a design is made
  bool solved = false;
  double min_current_A = -1e300;
  double max_current_A = 1e300;
  std::optional<Supply> supply;  // the supply's limits, if declared
};

// The quantities of a coil that the search may vary.
enum class CoilKey { radius, inner_radius, outer_radius, width, height, length, separation, turns,
                     centre_x, centre_y, centre_z, wire /* index into Coil::wire_options */ };
[[nodiscard]] std::string_view to_string(CoilKey k) noexcept;
[[nodiscard]] std::optional<CoilKey> coil_key_from_string(std::string_view s) noexcept;
// Read / write that quantity of a coil (SI units; turns as a count).
[[nodiscard]] double get(const Coil& c, CoilKey k);
void set(Coil& c, CoilKey k, double value);

// One free parameter: `key` of coil `coil` between min and max. Parameters tied to another
// (`same_as`) follow it and are not searched themselves.
struct FreeParameter {
  std::size_t coil = 0;  // index into Model::coils
  CoilKey key = CoilKey::radius;
  double start = 0.0, min = 0.0, max = 0.0;  // SI
  bool integer = false;                      // turns
  std::optional<std::size_t> same_as;        // index into Model::free_parameters of the leader
  SourceLocation where;                      // for errors found after parsing
  [[nodiscard]] std::string label(const std::vector<Coil>& coils) const;  // "<coil>.<key>"
};

enum class RegionKind { sphere, cylinder, box, plane, points };
enum class Goal { uniform, gradient, null };

// A known background field, B(r) = uniform + gradient * (r - centre) (gradient row i = dB_i/dx_j).
struct AmbientField {
  Vec3 uniform_T = Vec3::Zero();
  Mat3 gradient_T_per_m = Mat3::Zero();
  [[nodiscard]] Vec3 at(const Vec3& r, const Vec3& centre) const { return uniform_T + gradient_T_per_m * (r - centre); }
};

struct Tolerance {
  bool relative = true;  // relative to |wanted field| (or |gradient|*extent for gradient goals)
  double value = 1e-4;   // fraction (relative) or tesla (absolute)
};

struct Target {
  RegionKind region = RegionKind::sphere;
  Vec3 centre_m = Vec3::Zero();
  Vec3 axis = Vec3::UnitZ();        // cylinder axis, plane normal, box local z
  Vec3 reference = Vec3::UnitX();   // box local x / plane first in-plane direction
  double radius_m = 0.0;            // sphere, cylinder
  double length_m = 0.0;            // cylinder
  Vec3 size_m = Vec3::Zero();       // box [x, y, z] in its frame; plane [u, v, 0]
  std::string points_file;          // points region: the CSV it came from
  PointSet points;                  // points region
  Goal goal = Goal::uniform;
  Vec3 field_T = Vec3::Zero();              // uniform goal: wanted field (total, ambient included)
  double gradient_T_per_m = 0.0;            // gradient goal: d(B.axis)/d(axis)
  std::optional<AmbientField> ambient;      // background added to the coils' field
  Tolerance tolerance;
  int resolution = 0;  // sampling density: points per radius/half-length (0 = default)
};

enum class Objective { worst, rms, order };

// A limit on the field magnitude at a point outside the rig.
struct StrayLimit {
  Vec3 point_m = Vec3::Zero();
  double max_field_T = 0.0;
};

struct SearchOptions {
  Objective objective = Objective::worst;
  unsigned seed = 1;
  std::string global_algorithm = "multistart";  // multistart | mlsl | direct | crs | isres | none
  std::string local_algorithm = "auto";       // auto (sbplx for worst, bobyqa otherwise) | bobyqa | cobyla | neldermead | sbplx
  int starts = 16;                            // multi-start count for the global stage
  int max_evaluations = 20000;                // total objective evaluations
  double max_time_s = 60.0;                   // wall-clock budget
  int designs = 5;                            // how many ranked designs to keep
  // Constraints (absent = no limit).
  std::optional<double> max_outer_radius_m;   // every conductor within this distance of the target centre axis
  std::optional<double> max_half_length_m;    // every conductor within +- this along the target axis
  std::optional<double> min_bore_radius_m;    // clear bore about the target axis
  std::optional<double> min_gap_m;            // clear gap between windings
  std::optional<double> max_ampere_turns;     // total |N I| over all coils
  std::vector<StrayLimit> stray;
  RankBy rank_by = RankBy::objective;          // rank designs by nominal objective or by yield under [tolerance]
  int yield_samples = 200;                    // Monte Carlo builds per design when ranking by yield
};

struct Project {
  std::string name = "coilwright";
  std::string description;
};

struct Model {
  Project project;
  std::vector<Circuit> circuits;
  std::vector<Coil> coils;
  std::vector<FreeParameter> free_parameters;
  std::optional<Target> target;
  SearchOptions search;
  HardwareOptions hardware;  // [hardware]: temperatures, cooling, allowances, AC drive
  Tolerances tolerances;     // [tolerance] and per-coil overrides: how builds scatter
  std::vector<MapRequest> maps;  // [[map]]: field maps written with every design
  std::string source_file;                          // the file it was read from
  std::map<std::string, SourceLocation> locations;  // "coil.<name>", "coil.<name>.<key>", "circuit.<name>", "target.<key>", ...

  [[nodiscard]] std::size_t circuit_index(const std::string& name) const;  // throws std::out_of_range
  [[nodiscard]] SourceLocation location_of(const std::string& path) const;  // file only if unknown
};

}  // namespace coilwright
