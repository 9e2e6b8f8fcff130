// Winding packs: turns per layer, layers, fill factor, and the error when the turns do not fit.
#include <catch2/catch.hpp>

#include <cmath>

#include "coilwright/error.hpp"
#include "coilwright/winding.hpp"

using namespace coilwright;
using Catch::Matchers::Contains;

namespace {
Coil pack(double ri, double ro, double w, double turns) {
  Coil c;
  c.name = "x";
  c.shape = Shape::pack;
  c.inner_radius_m = ri;
  c.outer_radius_m = ro;
  c.width_m = w;
  c.turns = turns;
  return c;
}
}  // namespace

TEST_CASE("a pack is wound layer by layer", "[winding]") {
  const Wire w = awg_wire(20);
  const double d = w.outer_width_m();
  const Coil c = pack(0.05, 0.06, 0.020, 100);
  const WindingPack p = wind(c, w);
  const int per_layer = static_cast<int>(std::floor(0.020 / d));
  CHECK(p.turns == 100);
  CHECK(p.turns_per_layer == per_layer);
  CHECK(p.layers == (100 + per_layer - 1) / per_layer);
  CHECK(p.depth_m == Approx(p.layers * d).epsilon(1e-12));
  CHECK(p.fill_factor == Approx(100 * w.conductor_area_m2() / (0.010 * 0.020)).epsilon(1e-12));
  CHECK_FALSE(p.derived);
  // Mean turn: 2 pi times the mean radius of the wound turns, which lie within the pack.
  CHECK(p.mean_turn_length_m > 2 * M_PI * 0.05);
  CHECK(p.mean_turn_length_m < 2 * M_PI * (0.05 + p.depth_m));
  CHECK(p.cooling_area_m2 > 0.0);
}

TEST_CASE("orthocyclic packing needs fewer millimetres of depth", "[winding]") {
  const Wire w = metric_wire(0.5e-3);
  const Coil c = pack(0.05, 0.07, 0.020, 800);
  const WindingPack layered = wind(c, w, Packing::layered);
  const WindingPack ortho = wind(c, w, Packing::orthocyclic);
  CHECK(ortho.depth_m < layered.depth_m);
  // Layer pitch d sqrt(3)/2 instead of d (geometry of touching circles); every other layer holds
  // one turn less, so the depth ratio lies a little above sqrt(3)/2 = 0.866.
  const double ratio = ortho.depth_m / layered.depth_m;
  CHECK(ratio > 0.85);
  CHECK(ratio < 0.95);
}

TEST_CASE("turns that do not fit give the specific error", "[winding]") {
  const Wire w = awg_wire(20);
  const Coil c = pack(0.05, 0.055, 0.020, 500);
  const int per_layer = static_cast<int>(std::floor(0.020 / w.outer_width_m()));
  const int layers = (500 + per_layer - 1) / per_layer;
  CHECK_THROWS_AS(wind(c, w), InputError);
  CHECK_THROWS_WITH(wind(c, w), Contains("coil 'x': 500 turns of AWG 20") &&
                                    Contains("need " + std::to_string(layers) + " layers") &&
                                    Contains("but the pack is 5 mm deep"));

  Coil narrow = pack(0.05, 0.06, 0.0005, 10);
  CHECK_THROWS_WITH(wind(narrow, w), Contains("narrower than one turn"));

  Coil sol;
  sol.name = "s";
  sol.shape = Shape::solenoid;
  sol.radius_m = 0.02;
  sol.length_m = 0.05;
  sol.turns = 100;
  CHECK_THROWS_WITH(wind(sol, w), Contains("single-layer solenoid is 50 mm long"));
  sol.turns = 50;
  CHECK(wind(sol, w).layers == 1);
}

TEST_CASE("a loop's bundle is derived from its turns", "[winding]") {
  Coil c;
  c.name = "l";
  c.shape = Shape::loop;
  c.radius_m = 0.1;
  c.turns = 30;
  const Wire w = awg_wire(24);
  const WindingPack p = wind(c, w);
  CHECK(p.derived);
  CHECK(p.turns_per_layer == 6);  // ceil(sqrt(30))
  CHECK(p.layers == 5);
  CHECK(p.mean_turn_length_m == Approx(2 * M_PI * 0.1).epsilon(1e-12));
}
