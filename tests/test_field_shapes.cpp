// The field of every coil shape: closed forms, limits, and consistency between shapes.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "coilwright/constants.hpp"
#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/model.hpp"

using namespace coilwright;

namespace {

Vec3 field_at(const Coil& c, double current, const Vec3& p) {
  double x = p.x(), y = p.y(), z = p.z();
  double bx = 0.0, by = 0.0, bz = 0.0;
  add_coil_field(c, current, {&x, &y, &z, 1}, {&bx, &by, &bz});
  return {bx, by, bz};
}

bool near(const Vec3& got, const Vec3& want, double rel, double floor = 0.0) {
  return std::isfinite(got.norm()) && (got - want).norm() <= rel * want.norm() + floor;
}

Coil loop(double R, double turns = 1.0) {
  Coil c;
  c.name = "loop";
  c.shape = Shape::loop;
  c.radius_m = R;
  c.turns = turns;
  return c;
}

Coil pack(double ri, double ro, double w, double turns) {
  Coil c;
  c.name = "pack";
  c.shape = Shape::pack;
  c.inner_radius_m = ri;
  c.outer_radius_m = ro;
  c.width_m = w;
  c.turns = turns;
  return c;
}

Coil solenoid(double R, double L, double turns) {
  Coil c;
  c.name = "sol";
  c.shape = Shape::solenoid;
  c.radius_m = R;
  c.length_m = L;
  c.turns = turns;
  return c;
}

Coil rectangle(double w, double h) {
  Coil c;
  c.name = "rect";
  c.shape = Shape::rectangle;
  c.width_m = w;
  c.height_m = h;
  return c;
}

Coil regular_polygon(double R, int n) {
  Coil c;
  c.name = "poly";
  c.shape = Shape::polygon;
  for (int k = 0; k < n; ++k) {
    const double t = 2.0 * pi * k / n;
    c.vertices_m.emplace_back(R * std::cos(t), R * std::sin(t), 0.0);
  }
  return c;
}

// A proper rotation from Rodrigues' formula.
Mat3 rotation(const Vec3& axis, double angle) { return Eigen::AngleAxisd(angle, axis.normalized()).toRotationMatrix(); }

Coil rotated(Coil c, const Mat3& Q) {
  c.centre_m = Q * c.centre_m;
  c.axis = Q * c.axis;
  c.width_axis = Q * c.width_axis;
  for (Vec3& v : c.vertices_m) v = Q * v;
  return c;
}

// Every shape, placed off the origin with a tilted axis, for the generic checks.
std::vector<Coil> every_shape() {
  std::vector<Coil> v;
  const Vec3 axis = Vec3(0.2, -0.3, 1.0).normalized();
  const Vec3 wa = axis.cross(Vec3::UnitY()).normalized();
  auto place = [&](Coil c, const Vec3& centre) {
    c.centre_m = centre;
    c.axis = axis;
    c.width_axis = wa;
    return c;
  };
  v.push_back(place(loop(0.3, 10), Vec3(0.05, 0.0, -0.02)));
  v.push_back(place(pack(0.25, 0.31, 0.04, 120), Vec3(0.0, 0.03, 0.01)));
  v.push_back(place(solenoid(0.2, 0.5, 300), Vec3(0.0, 0.0, 0.0)));
  Coil ml = solenoid(0.0, 0.45, 800);
  ml.inner_radius_m = 0.15;
  ml.outer_radius_m = 0.19;
  v.push_back(place(ml, Vec3(0.01, 0.0, 0.0)));
  v.push_back(place(rectangle(0.5, 0.3), Vec3(0.0, 0.02, 0.0)));
  Coil thick = rectangle(0.5, 0.35);
  thick.depth_m = 0.02;
  thick.thickness_m = 0.015;
  thick.turns = 40;
  v.push_back(place(thick, Vec3(0.0, 0.0, 0.03)));
  Coil poly = regular_polygon(0.3, 5);
  poly.vertices_m[2] += Vec3(0.05, 0.0, 0.02);  // not regular, not planar
  v.push_back(place(poly, Vec3(0.02, 0.01, 0.0)));
  Coil pair = place(pack(0.25, 0.28, 0.03, 50), Vec3(0.0, 0.0, 0.0));
  pair.separation_m = 0.3;
  v.push_back(pair);
  Coil anti = place(loop(0.3, 20), Vec3(0.0, 0.0, 0.0));
  anti.separation_m = 0.4;
  anti.opposed = true;
  v.push_back(anti);
  return v;
}

// Points clear of every shape above (the conductors lie within 0.35 m of the origin, and
// the axial extent is within 0.25 m): a shell between 0.45 m and 1 m, and near the centre.
std::vector<Vec3> clear_points() {
  return {Vec3(0.0, 0.0, 0.0),   Vec3(0.03, -0.02, 0.05), Vec3(0.5, 0.3, 0.2),
          Vec3(-0.6, 0.1, -0.4), Vec3(0.2, -0.7, 0.5),    Vec3(0.1, 0.1, -0.9)};
}

}  // namespace

TEST_CASE("loop: on-axis closed form for any axis, turns and current", "[field][loop]") {
  // Source: B = mu0 N I R^2 / (2 (R^2 + z^2)^{3/2}) along the axis (Jackson, Classical
  // Electrodynamics, 3rd ed., sec. 5.5). Tolerance: a few ulp of the double evaluation.
  Coil c = loop(0.25, 7);
  c.centre_m = Vec3(0.1, -0.2, 0.3);
  c.axis = Vec3(1.0, 2.0, -0.5).normalized();
  for (double z : {0.0, 0.07, -0.4, 2.0}) {
    const Vec3 b = field_at(c, 1.5, c.centre_m + z * c.axis);
    const double s = 0.25 * 0.25 + z * z;
    const double want = mu0 * 7 * 1.5 * 0.25 * 0.25 / (2.0 * s * std::sqrt(s));
    CHECK(near(b, want * c.axis, 1e-14));
  }
}

TEST_CASE("solenoid sheet: on-axis closed form", "[field][solenoid]") {
  // Source: B = mu0 n I (cos t1 - cos t2) / 2 on the axis of a finite solenoid, t the angles
  // subtended by the ends (Griffiths, Introduction to Electrodynamics, 4th ed., Problem 5.11).
  const double R = 0.1, L = 0.6, N = 500, I = 2.0;
  const Coil c = solenoid(R, L, N);
  for (double z : {0.0, 0.1, 0.29, 0.31, -0.5, 3.0}) {
    // In long double: far outside, cos t1 - cos t2 cancels (1e-4 at z = 3 m).
    const long double u1 = z + L / 2, u2 = z - L / 2, r = R;
    const long double cos1 = u1 / std::sqrt(u1 * u1 + r * r), cos2 = u2 / std::sqrt(u2 * u2 + r * r);
    const double want = static_cast<double>(mu0 * N / L * I * (cos1 - cos2) / 2.0L);
    // 1e-14: cel's stopping rule gives ~1e-16, a few roundings in the two ends' terms; far
    // outside, the closed form is itself a difference of the ends' terms and loses
    // eps (|cos t1| + |cos t2|) / |cos t1 - cos t2| (2e-12 at z = 3 m).
    const double cancel = static_cast<double>((std::fabs(cos1) + std::fabs(cos2)) / std::fabs(cos1 - cos2));
    const Vec3 got = field_at(c, I, Vec3(0, 0, z));
    INFO("z=" << z << " got " << got.transpose() << " want " << want);
    CHECK(near(got, Vec3(0, 0, want), 1e-14 + 4e-16 * cancel));
  }
}

TEST_CASE("thick pack: field at the centre and on the axis", "[field][pack]") {
  // Source: B0 = mu0 N I / (2 (a2 - a1)) ln((a2 + sqrt(a2^2 + l^2)) / (a1 + sqrt(a1^2 + l^2))),
  // l = width/2 (D. B. Montgomery, Solenoid Magnet Design, Wiley 1969, ch. 1); on the axis the
  // same integral of sheets gives (mu0 J / 2) [u ln(..u..)]_{u = z - l}^{u = z + l}.
  const double a1 = 0.12, a2 = 0.2, w = 0.1, N = 400, I = 1.5;
  const Coil c = pack(a1, a2, w, N);
  const double l = w / 2;
  const double b0 = mu0 * N * I / (2 * (a2 - a1)) * std::log((a2 + std::hypot(a2, l)) / (a1 + std::hypot(a1, l)));
  // The quadrature targets ~1e-13; the centre is 0.12 m from a 0.08 m x 0.1 m section.
  CHECK(near(field_at(c, I, Vec3::Zero()), Vec3(0, 0, b0), 1e-12));
  const double J = N * I / ((a2 - a1) * w);
  auto term = [&](double u) { return u * std::log((a2 + std::hypot(a2, u)) / (a1 + std::hypot(a1, u))); };
  for (double z : {0.03, 0.2, -0.35}) {
    const double want = mu0 * J / 2 * (term(z + l) - term(z - l));
    CHECK(near(field_at(c, I, Vec3(0, 0, z)), Vec3(0, 0, want), 1e-12));
  }
}

TEST_CASE("square loop: field at the centre", "[field][rectangle]") {
  // Source: B = 2 sqrt(2) mu0 I / (pi a) at the centre of a square loop of side a (four
  // finite wires, Griffiths, Introduction to Electrodynamics, 4th ed., Problem 5.8).
  for (double side : {0.1, 1.3}) {
    Coil c = rectangle(side, side);
    c.axis = Vec3(0, 1, 0);
    c.width_axis = Vec3(0, 0, 1);
    const double want = 2.0 * std::sqrt(2.0) * mu0 * 3.0 / (pi * side);
    CHECK(near(field_at(c, 3.0, Vec3::Zero()), Vec3(0, want, 0), 1e-14));
  }
}

TEST_CASE("long solenoid tends to the ideal mu0 n I inside and no field outside", "[field][solenoid]") {
  // Source: the ideal infinite solenoid, B = mu0 n I inside, 0 outside (Ampere's law). With
  // L/R = 1000 the end corrections within |z| < L/4 are below ~5e-6 (from the on-axis form),
  // and the stray field at rho = 2R is of order (R/L)^2 (the ends' pole strength).
  const double R = 0.01, L = 1000 * R, N = 2e5, I = 0.7;
  const Coil c = solenoid(R, L, N);
  const double ideal = mu0 * N / L * I;
  for (double z : {0.0, 0.1 * L, -0.2 * L, 0.249 * L}) {
    for (double rho : {0.0, 0.3 * R, 0.6 * R, 0.9 * R}) {
      const Vec3 b = field_at(c, I, Vec3(rho * 0.6, rho * 0.8, z));
      CHECK(std::fabs(b.z() - ideal) < 1e-5 * ideal);
      CHECK(std::hypot(b.x(), b.y()) < 1e-5 * ideal);
    }
    CHECK(field_at(c, I, Vec3(2 * R, 0, z)).norm() < 1e-3 * ideal);
  }
}

TEST_CASE("pack of vanishing cross-section tends to the loop", "[field][pack]") {
  // The difference is the second moment of the section: O((eps/distance)^2) relative.
  const double R = 0.3;
  const Coil ref = loop(R, 25);
  for (double eps : {1e-3, 1e-4}) {
    const Coil p = pack(R - eps, R + eps, 2 * eps, 25);
    for (const Vec3& pt : {Vec3(0, 0, 0), Vec3(0.1, 0.05, 0.2), Vec3(0.5, 0, -0.1), Vec3(0.0, 0.2, 0.6)}) {
      const Vec3 want = field_at(ref, 1.0, pt);
      // distance >= 0.15 m: (eps/0.15)^2 <= 4.4e-5 (eps = 1e-3); 4.4e-7 (eps = 1e-4).
      CHECK(near(field_at(p, 1.0, pt), want, 50 * (eps / 0.15) * (eps / 0.15)));
    }
  }
}

TEST_CASE("multi-layer solenoid equals a pack of the same section", "[field][solenoid][pack]") {
  // Both are a uniform current density over the same rectangle: radial quadrature of exact
  // sheets vs. two-dimensional quadrature of loops; each targets ~1e-13.
  const double ri = 0.1, ro = 0.16, len = 0.22, N = 900;
  Coil ml = solenoid(0.0, len, N);
  ml.inner_radius_m = ri;
  ml.outer_radius_m = ro;
  const Coil p = pack(ri, ro, len, N);
  for (const Vec3& pt : {Vec3(0, 0, 0), Vec3(0.05, 0.02, 0.08), Vec3(0.13, 0.0, 0.2), Vec3(0.3, 0.1, -0.05),
                         Vec3(0.0, 0.0, 0.5)}) {
    CHECK(near(field_at(ml, 1.0, pt), field_at(p, 1.0, pt), 1e-11));
  }
}

TEST_CASE("solenoid tends to the sum of its turns far enough away", "[field][solenoid]") {
  // N loops at the midpoints of N equal axial slices: the midpoint rule for the sheet's axial
  // integral, error ~ (L/N)^2 / 24 * (second derivative) ~ (L/(N dist))^2 relative.
  const double R = 0.1, L = 0.3, N = 200;
  const Coil sheet = solenoid(R, L, N);
  for (const Vec3& pt : {Vec3(0.4, 0.0, 0.1), Vec3(0.0, 0.05, 0.6), Vec3(0.3, 0.3, -0.4)}) {
    Vec3 sum = Vec3::Zero();
    for (int k = 0; k < N; ++k) {
      Coil t = loop(R);
      t.centre_m = Vec3(0, 0, -L / 2 + (k + 0.5) * L / N);
      sum += field_at(t, 1.0, pt);
    }
    // distance >= 0.25 m: (0.3 / (200 * 0.25))^2 = 3.6e-5; take 1e-4.
    CHECK(near(field_at(sheet, 1.0, pt), sum, 1e-4));
  }
}

TEST_CASE("regular polygon tends to the circle as 1/N^2", "[field][polygon]") {
  // At the centre of an inscribed regular N-gon, B = mu0 I N tan(pi/N) / (2 pi R)
  // (N finite wires at distance R cos(pi/N), Griffiths Example 5.5), i.e. the circle's
  // mu0 I/(2R) times 1 + pi^2/(3 N^2) + O(N^-4).
  const double R = 0.2;
  const Vec3 circle = field_at(loop(R), 1.0, Vec3::Zero());
  for (int n : {16, 64, 256}) {
    const Vec3 b = field_at(regular_polygon(R, n), 1.0, Vec3::Zero());
    const double exact = mu0 * n * std::tan(pi / n) / (2 * pi * R);
    CHECK(std::fabs(b.z() - exact) <= 1e-13 * exact);
    // Next term of the series: 2 pi^4 / (15 N^2) after scaling by N^2 (13/N^2); allow 15/N^2.
    const double scaled = (b.z() / circle.z() - 1.0) * n * n;
    CHECK(std::fabs(scaled - pi * pi / 3) <= 15.0 / (n * n) + 1e-6);
  }
  // Off the centre: the error falls by ~4 per doubling of N.
  const Vec3 pt(0.07, 0.03, 0.05);
  const Vec3 want = field_at(loop(R), 1.0, pt);
  const double e1 = (field_at(regular_polygon(R, 50), 1.0, pt) - want).norm();
  const double e2 = (field_at(regular_polygon(R, 100), 1.0, pt) - want).norm();
  CHECK(e1 / e2 > 3.8);
  CHECK(e1 / e2 < 4.2);
}

TEST_CASE("thick rectangle equals the sum of its filament rectangles", "[field][rectangle]") {
  // Midpoint rule over an M x M grid of filament rectangles: error ~ (section/M)^2/24 relative
  // to the section's second moment, tiny at 0.15 m from a 2 cm x 1.5 cm section.
  Coil thick = rectangle(0.5, 0.35);
  thick.depth_m = 0.02;
  thick.thickness_m = 0.015;
  thick.turns = 40;
  const int M = 40;
  for (const Vec3& pt : {Vec3(0, 0, 0), Vec3(0.1, -0.05, 0.15), Vec3(0.6, 0.4, 0.3)}) {
    Vec3 sum = Vec3::Zero();
    for (int i = 0; i < M; ++i)
      for (int j = 0; j < M; ++j) {
        const double s = thick.depth_m * ((i + 0.5) / M - 0.5);
        const double t = thick.thickness_m * ((j + 0.5) / M - 0.5);
        Coil f = rectangle(thick.width_m + 2 * s, thick.height_m + 2 * s);
        f.centre_m = Vec3(0, 0, t);
        f.turns = thick.turns / (M * M);
        sum += field_at(f, 1.0, pt);
      }
    CHECK(near(field_at(thick, 1.0, pt), sum, 1e-6));
  }
}

TEST_CASE("rotating coil and point together rotates the field", "[field]") {
  const Mat3 Q = rotation(Vec3(0.3, 1.0, -0.4), 1.234);
  for (const Coil& c : every_shape()) {
    const Coil r = rotated(c, Q);
    for (const Vec3& p : clear_points()) {
      INFO(c.name << " at " << p.transpose());
      // Only roundings differ (the quadrature orders depend on distances, which agree).
      CHECK(near(field_at(r, 1.3, Q * p), Q * field_at(c, 1.3, p), 1e-12, 1e-22));
    }
  }
}

TEST_CASE("superposition: pairs, circuits and the model", "[field]") {
  // A pair is its two windings; an opposed pair reverses the second.
  Coil pair = pack(0.2, 0.24, 0.03, 60);
  pair.axis = Vec3(0, 1, 0);
  pair.centre_m = Vec3(0.01, 0.02, 0.0);
  pair.separation_m = 0.22;
  Coil lo = pair, hi = pair;
  lo.separation_m.reset();
  hi.separation_m.reset();
  lo.centre_m -= 0.11 * pair.axis;
  hi.centre_m += 0.11 * pair.axis;
  const Vec3 p(0.05, -0.03, 0.04);
  CHECK(near(field_at(pair, 2.0, p), field_at(lo, 2.0, p) + field_at(hi, 2.0, p), 1e-14, 1e-22));
  pair.opposed = true;
  CHECK(near(field_at(pair, 2.0, p), field_at(lo, 2.0, p) - field_at(hi, 2.0, p), 1e-14, 1e-22));

  // The model's field is the sum over circuits of current x field per ampere.
  Model m;
  m.circuits = {Circuit{"main", 2.5}, Circuit{"trim", -0.4}};
  std::vector<Coil> shapes = every_shape();
  for (std::size_t i = 0; i < shapes.size(); ++i) {
    shapes[i].circuit = i % 2 == 0 ? "main" : "trim";
    m.coils.push_back(shapes[i]);
  }
  PointSet pts;
  for (const Vec3& q : clear_points()) pts.push_back(q);
  for (int k = 0; k < 3000; ++k) pts.push_back(Vec3(0.6 + 1e-4 * k, -0.2, 0.1));  // several chunks
  const FieldSet total = field_of_model(m, pts);
  const FieldSet a = field_per_ampere(m, 0, pts);
  const FieldSet b = field_per_ampere(m, 1, pts);
  for (std::size_t i = 0; i < pts.size(); ++i) {
    Vec3 direct = Vec3::Zero();
    for (const Coil& c : m.coils) direct += field_at(c, c.circuit == "main" ? 2.5 : -0.4, pts[i]);
    REQUIRE(near(total[i], 2.5 * a[i] - 0.4 * b[i], 1e-13, 1e-22));
    REQUIRE(near(total[i], direct, 1e-13, 1e-22));
  }
}

TEST_CASE("divergence and curl vanish away from conductors", "[field]") {
  // Central differences with step h: truncation ~ (h/l)^2 / 6 of the gradient for a conductor
  // at distance l >= 0.1 m (1e-9 here), rounding ~ eps |B| / h (1e-11 of the gradient scale);
  // the quadrature's order switches leave ~1e-13 |B| / h. Tolerance 1e-6 of |grad B|.
  const double h = 1e-5;
  for (const Coil& c : every_shape()) {
    for (const Vec3& p : clear_points()) {
      Mat3 G;  // G(i, j) = dB_i / dx_j
      for (int j = 0; j < 3; ++j) {
        const Vec3 e = h * Vec3::Unit(j);
        G.col(j) = (field_at(c, 1.0, p + e) - field_at(c, 1.0, p - e)) / (2 * h);
      }
      const double div = G.trace();
      const Vec3 curl(G(2, 1) - G(1, 2), G(0, 2) - G(2, 0), G(1, 0) - G(0, 1));
      INFO(c.name << " at " << p.transpose());
      // Floor |B|/(1 m) * 1e-6: at a pair's midpoint the gradient itself vanishes by symmetry.
      const double scale = G.norm() + field_at(c, 1.0, p).norm();
      CHECK(std::fabs(div) <= 1e-6 * scale);
      CHECK(curl.norm() <= 1e-6 * scale);
    }
  }
}

TEST_CASE("points on the axis give finite fields along the axis", "[field]") {
  for (const Coil& c : every_shape()) {
    if (c.shape == Shape::rectangle || c.shape == Shape::polygon) continue;
    for (double z : {0.0, 0.05, -0.7, 1e-12}) {
      const Vec3 b = field_at(c, 1.0, c.centre_m + z * c.axis);
      INFO(c.name << " z=" << z);
      REQUIRE(std::isfinite(b.x()));
      REQUIRE(std::isfinite(b.y()));
      REQUIRE(std::isfinite(b.z()));
      // Axisymmetric: the field is along the axis (roundings of the frame only). Floor 1e-18 T/A
      // (1e-14 of the ~1e-4 T/A of these coils): the opposed pair's midpoint field is zero.
      CHECK((b - b.dot(c.axis) * c.axis).norm() <= 1e-14 * b.norm() + 1e-18);
    }
  }
}

TEST_CASE("check_clear_of_windings refuses points in or on conductors", "[field][domain]") {
  std::vector<Coil> coils = {pack(0.2, 0.25, 0.04, 100), loop(0.3, 1)};
  coils[0].name = "outer pack";
  coils[1].name = "probe loop";
  coils[1].centre_m = Vec3(0, 0, 0.5);
  PointSet ok;
  ok.push_back(Vec3(0, 0, 0));
  ok.push_back(Vec3(0.1, 0.0, 0.3));
  CHECK_NOTHROW(check_clear_of_windings(coils, ok));

  PointSet in_pack;
  in_pack.push_back(Vec3(0, 0.22, 0.01));
  CHECK_THROWS_AS(check_clear_of_windings(coils, in_pack), DomainError);
  CHECK_THROWS_WITH(check_clear_of_windings(coils, in_pack), Catch::Contains("outer pack") && Catch::Contains("0.22"));

  PointSet on_wire;
  on_wire.push_back(Vec3(0.3, 0.0, 0.5));
  CHECK_THROWS_AS(check_clear_of_windings(coils, on_wire), DomainError);
  CHECK_THROWS_WITH(check_clear_of_windings(coils, on_wire), Catch::Contains("probe loop"));

  // A single-layer sheet refuses its own surface, not the cylinder beyond its ends.
  std::vector<Coil> sheet = {solenoid(0.1, 0.2, 10)};
  PointSet on_sheet, beyond;
  on_sheet.push_back(Vec3(0.0, 0.1, 0.05));
  beyond.push_back(Vec3(0.0, 0.1, 0.15));
  CHECK_THROWS_AS(check_clear_of_windings(sheet, on_sheet), DomainError);
  CHECK_NOTHROW(check_clear_of_windings(sheet, beyond));
  Vec3 bb = field_at(sheet[0], 1.0, Vec3(0.0, 0.1, 0.15));
  CHECK(std::isfinite(bb.norm()));
}
