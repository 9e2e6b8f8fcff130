// Supply limits steer the search: every returned feasible design respects them, and a tighter
// current limit forces more turns (or a different wire) for the same ampere-turns.
#include <catch2/catch.hpp>

#include <cmath>

#include <fmt/format.h>

#include "coilwright/config.hpp"
#include "coilwright/evaluator.hpp"
#include "coilwright/search.hpp"
#include "coilwright/supply.hpp"

using namespace coilwright;

namespace {

// A pair of packs for 1 mT; the turns and the wire are free, the current solved within the supply.
std::string rig(const std::string& supply, const std::string& wires) {
  return fmt::format(R"(
[[circuit]]
name = "main"
current = {{ min = "-20 A", max = "20 A" }}
supply = {}
[[coil]]
name = "pair"
shape = "pack"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
inner_radius = "100 mm"
outer_radius = "125 mm"
width = "30 mm"
separation = "112 mm"
turns = {{ start = 30, min = 10, max = 400 }}
wire = {}
[target]
region = "sphere"
centre = ["0 m", "0 m", "0 m"]
axis = [0, 0, 1]
radius = "20 mm"
goal = "uniform"
field = ["0 T", "0 T", "1 mT"]
tolerance = "0.1 %"
[search]
objective = "worst"
seed = 5
starts = 6
designs = 3
max_evaluations = 3000
)", supply, wires);
}

void check_all_limits(const SearchSummary& s) {
  REQUIRE_FALSE(s.designs.empty());
  for (const Design& d : s.designs) {
    if (!d.constraints.feasible()) continue;
    std::vector<double> I;
    for (const Circuit& c : d.model.circuits) I.push_back(c.current_A);
    const SupplyCheck check = check_supplies(d.model, I, d.model.hardware);
    INFO(fmt::format("turns {}, current {} A", d.model.coils[0].turns, I[0]));
    CHECK(check.ok());
    CHECK(check.worst_excess <= 0.0);
  }
}

}  // namespace

TEST_CASE("a supply-limited search respects every limit", "[search][supply]") {
  const Model m = parse_model(rig(R"({ max_current = "3 A", max_voltage = "24 V", max_power = "40 W" })", R"("AWG 20")"),
                              "supply.toml");
  const SearchSummary s = run_search(m);
  REQUIRE(s.designs.front().constraints.feasible());
  check_all_limits(s);
}

TEST_CASE("tightening the current limit raises the turns", "[search][supply]") {
  // N I is fixed by the field (about 0.1 kA-turns per winding here), so N >= NI / I_max.
  const auto best_turns = [](const std::string& limit) {
    const Model m = parse_model(rig(fmt::format(R"({{ max_current = "{}" }})", limit), R"("AWG 22")"), "supply.toml");
    const SearchSummary s = run_search(m);
    REQUIRE(s.designs.front().constraints.feasible());
    check_all_limits(s);
    const Design& d = s.designs.front();
    return std::pair{d.model.coils[0].turns, std::abs(d.model.circuits[0].current_A)};
  };
  const auto [loose_turns, loose_current] = best_turns("10 A");
  const auto [tight_turns, tight_current] = best_turns("0.5 A");
  CHECK(tight_current <= 0.5 * (1 + 1e-12));
  CHECK(tight_turns > loose_turns);
  CHECK(tight_turns * tight_current == Approx(loose_turns * loose_current).epsilon(0.02));
}

TEST_CASE("a voltage limit makes the search choose a thicker wire from the list", "[search][supply]") {
  // At fixed ampere-turns the voltage does not depend on the turns (V = NI rho l/A per turn): about
  // 4 V for AWG 18 and 16x that for AWG 30 here, so an 8 V limit leaves only the thick wire.
  const std::string wires = R"(["AWG 30", "AWG 18"])";
  const Model loose = parse_model(rig(R"({ max_current = "5 A", max_voltage = "100 V" })", wires), "supply.toml");
  const Model tight = parse_model(rig(R"({ max_current = "5 A", max_voltage = "8 V" })", wires), "supply.toml");
  const SearchSummary s_tight = run_search(tight);
  REQUIRE(s_tight.designs.front().constraints.feasible());
  check_all_limits(s_tight);
  CHECK(s_tight.designs.front().model.coils[0].wire_choice == 1);
  const SearchSummary s_loose = run_search(loose);
  check_all_limits(s_loose);
}
