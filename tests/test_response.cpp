// The response matrix and its cache.
// Rule: a column is the coil's field per ampere, the same as add_coil_field gives (the loop's
// own path differs from the general one only in rounding), and a cache updated after any
// sequence of moves equals a matrix built afresh for the final geometry.
#include <catch2/catch.hpp>

#include <cmath>
#include <random>

#include "coilwright/field.hpp"
#include "coilwright/model.hpp"
#include "coilwright/response.hpp"

using namespace coilwright;

namespace {

Coil loop(const std::string& name, const std::string& circuit, double R, double turns) {
  Coil c;
  c.name = name;
  c.circuit = circuit;
  c.shape = Shape::loop;
  c.radius_m = R;
  c.turns = turns;
  return c;
}

// Points around a coil of radius ~0.5 m: on the axis, near the plane, far away; more than one
// chunk of the parallel loop and a ragged last chunk.
PointSet scattered_points(std::size_t n) {
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> u(-0.8, 0.8);
  PointSet p;
  p.push_back(Vec3(0.0, 0.0, 0.0));
  p.push_back(Vec3(0.0, 0.0, 0.3));
  p.push_back(Vec3(3.0, -2.0, 7.0));
  while (p.size() < n) p.push_back(Vec3(u(rng), u(rng), u(rng)));
  return p;
}

FieldSet reference(const Coil& c, const PointSet& pts) {
  FieldSet f(pts.size());
  add_coil_field(c, 1.0, view(pts), view(f));
  return f;
}

}  // namespace

TEST_CASE("a loop's response column equals add_coil_field for single and paired windings on any axis", "[response]") {
  const PointSet pts = scattered_points(700);
  Coil single = loop("a", "c", 0.45, 7.0);
  Coil pair = loop("b", "c", 0.37, 3.0);
  pair.separation_m = 0.41;
  Coil opposed = pair;
  opposed.opposed = true;
  Coil tilted = pair;
  tilted.axis = Vec3(0.3, -0.5, 0.8).normalized();
  tilted.centre_m = Vec3(0.05, -0.02, 0.11);
  for (const Coil& c : {single, pair, opposed, tilted}) {
    const Eigen::VectorXd col = coil_response(c, pts);
    const FieldSet want = reference(c, pts);
    const std::size_t n = pts.size();
    REQUIRE(col.size() == static_cast<Eigen::Index>(3 * n));
    for (std::size_t i = 0; i < n; ++i) {
      const Vec3 got(col[static_cast<Eigen::Index>(i)], col[static_cast<Eigen::Index>(n + i)],
                     col[static_cast<Eigen::Index>(2 * n + i)]);
      // The two paths round differently: 1e-13 of |B| (both are ~1e-15 from the exact field,
      // except near the wire, where the inputs fix B only to ~eps a/distance).
      CHECK((got - want[i]).norm() <= 1e-13 * want[i].norm() + 1e-30);
    }
  }
}

TEST_CASE("the cache after moves equals a fresh matrix and sums circuits of several coils", "[response]") {
  Model m;
  m.circuits.resize(2);
  m.circuits[0].name = "one";
  m.circuits[1].name = "two";
  m.coils = {loop("a", "one", 0.5, 10.0), loop("b", "two", 0.38, 10.0), loop("c", "two", 0.6, 4.0)};
  m.coils[1].separation_m = 0.5;
  const PointSet pts = scattered_points(300);
  ResponseCache cache(pts);
  (void)cache.update(m);
  // Move the pair, then the single coil of circuit one, then put a coil on the other circuit.
  m.coils[1].separation_m = 0.62;
  (void)cache.update(m);
  m.coils[0].radius_m = 0.52;
  (void)cache.update(m);
  m.coils[2].circuit = "one";
  const ResponseMatrix got = cache.update(m);
  ResponseCache fresh(pts);
  const ResponseMatrix want = fresh.update(m);
  REQUIRE(got.rows() == want.rows());
  REQUIRE(got.cols() == want.cols());
  CHECK((got - want).norm() == 0.0);  // the same sums in the same order
  const Eigen::VectorXd sum = coil_response(m.coils[0], pts) + coil_response(m.coils[2], pts);
  CHECK((got.col(0) - sum).norm() <= 1e-15 * sum.norm());
  CHECK((got.col(1) - coil_response(m.coils[1], pts)).norm() == 0.0);
}
