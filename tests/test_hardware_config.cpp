// Config keys of the hardware figures: a coil's wire, a circuit's supply, the [hardware] table;
// their errors carry file:line, and a design written back reads the same.
#include <catch2/catch.hpp>

#include <string>

#include "coilwright/config.hpp"
#include "coilwright/design_writer.hpp"
#include "coilwright/error.hpp"
#include "coilwright/model.hpp"

using namespace coilwright;
using Catch::Matchers::Contains;

namespace {

std::string config(const std::string& wire, const std::string& circuit_extra = "", const std::string& tail = "",
                   int turns = 100) {
  return R"([[circuit]]
name = "main"
current = "2 A"
)" + circuit_extra + R"(
[[coil]]
name = "helm"
shape = "pack"
inner_radius = "95 mm"
outer_radius = "105 mm"
width = "10 mm"
turns = )" + std::to_string(turns) + R"(
separation = "100 mm"
)" + wire + "\n" + tail;
}

std::string message_of(const std::string& text) {
  try {
    (void)parse_model(text, "hw.toml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

}  // namespace

TEST_CASE("a coil's wire is read in every form", "[hardware][config]") {
  CHECK(parse_model(config("wire = \"AWG 20\""), "hw.toml").coils[0].wire->label == "AWG 20");
  CHECK(parse_model(config("wire = \"0.8 mm\""), "hw.toml").coils[0].wire->bare_diameter_m == Approx(0.8e-3).epsilon(1e-12));
  const Model t = parse_model(config(R"(wire = { diameter = "0.75 mm", insulation = "grade 1", material = "aluminium" })"), "hw.toml");
  REQUIRE(t.coils[0].wire);
  CHECK(t.coils[0].wire->bare_diameter_m == Approx(0.75e-3).epsilon(1e-12));
  CHECK(t.coils[0].wire->material.name == "aluminium");
  CHECK(t.coils[0].wire->insulation_m == Approx(enamel_build_m(0.75e-3, 1)).epsilon(1e-12));
  const Model custom = parse_model(
      config(R"(wire = { diameter = "1 mm", insulation = "0.05 mm", material = "silver", resistivity = "0.0159 ohm mm2/m", temperature_coefficient = "0.0038 /K", density = "10490 kg/m3" })", "", "", 40),
      "hw.toml");
  CHECK(custom.coils[0].wire->material.resistivity_ohm_m == Approx(1.59e-8).epsilon(1e-12));
  CHECK(custom.coils[0].wire->material.density_kg_m3 == Approx(10490).epsilon(1e-12));
  CHECK_FALSE(parse_model(config(""), "hw.toml").coils[0].wire);
}

TEST_CASE("supplies and the [hardware] table are read", "[hardware][config]") {
  const Model m = parse_model(config("wire = \"AWG 20\"", R"(supply = { max_current = "5 A", max_voltage = "30 V" })",
                                     R"toml(
[hardware]
ambient_temperature = "25 degC"
heat_transfer = "8 W/(m^2 K)"
insulation_class = "H"
lead_allowance = "1 m"
spare = "15 %"
packing = "orthocyclic"
frequency = "50 Hz"
ramp_rate = "2 A/ms"
)toml"),
                              "hw.toml");
  REQUIRE(m.circuits[0].supply);
  CHECK(*m.circuits[0].supply->max_current_A == Approx(5.0).epsilon(1e-15));
  CHECK(*m.circuits[0].supply->max_voltage_V == Approx(30.0).epsilon(1e-15));
  CHECK_FALSE(m.circuits[0].supply->max_power_W);
  CHECK(m.hardware.ambient_temperature_K == Approx(298.15).epsilon(1e-15));
  CHECK(m.hardware.heat_transfer_W_m2K == Approx(8.0).epsilon(1e-15));
  CHECK(m.hardware.insulation_class_C == 180);
  CHECK(m.hardware.lead_allowance_m == Approx(1.0).epsilon(1e-15));
  CHECK(m.hardware.spare_fraction == Approx(0.15).epsilon(1e-14));
  CHECK(m.hardware.packing == Packing::orthocyclic);
  CHECK(*m.hardware.frequency_Hz == Approx(50.0).epsilon(1e-15));
  CHECK(*m.hardware.ramp_rate_A_per_s == Approx(2000.0).epsilon(1e-14));

  // Written back and read again: the same wire, supply and settings.
  const Model back = parse_model(write_model_toml(m), "design.toml");
  CHECK(back.coils[0].wire->label == "AWG 20");
  CHECK(*back.circuits[0].supply->max_voltage_V == Approx(30.0).epsilon(1e-15));
  CHECK(back.hardware.insulation_class_C == 180);
  CHECK(back.hardware.packing == Packing::orthocyclic);
  CHECK(*back.hardware.ramp_rate_A_per_s == Approx(2000.0).epsilon(1e-14));
  CHECK(back.hardware.ambient_temperature_K == Approx(298.15).epsilon(1e-15));
}

TEST_CASE("a table wire that is not in the catalogue is written back in full", "[hardware][config]") {
  const Model m = parse_model(config(R"(wire = { width = "4 mm", thickness = "1.5 mm", corner_radius = "0.5 mm", insulation = "0.05 mm" })", "", "", 10),
                              "hw.toml");
  const Model back = parse_model(write_model_toml(m), "design.toml");
  REQUIRE(back.coils[0].wire);
  CHECK(back.coils[0].wire->form == WireForm::rectangular);
  CHECK(back.coils[0].wire->corner_radius_m == Approx(0.5e-3).epsilon(1e-14));
  CHECK(back.coils[0].wire->conductor_area_m2() == Approx(m.coils[0].wire->conductor_area_m2()).epsilon(1e-14));
}

TEST_CASE("hardware config errors name the place and the rule", "[hardware][config]") {
  CHECK_THAT(message_of(config("wire = \"0.7 mm\"")), Contains("hw.toml:13:") && Contains("0.670 mm or 0.710 mm"));
  CHECK_THAT(message_of(config(R"(wire = { diameter = "0.8 mm", insulation = "grade 5" })")),
             Contains("hw.toml:13:") && Contains("grades are 1, 2 and 3"));
  CHECK_THAT(message_of(config(R"(wire = { diameter = "0.8 mm", colour = "red" })")), Contains("unknown key"));
  CHECK_THAT(message_of(config("wire = \"AWG 20\"", R"(supply = { max_amps = "5 A" })")), Contains("hw.toml:4:"));
  CHECK_THAT(message_of(config("wire = \"AWG 20\"", R"(supply = { max_current = "5 V" })")), Contains("hw.toml:4:"));
  CHECK_THAT(message_of(config("wire = \"AWG 20\"", "", "[hardware]\ninsulation_class = \"X\"\n")),
             Contains("hw.toml:15:") && Contains("IEC 60085"));
  CHECK_THAT(message_of(config("wire = \"AWG 20\"", "", "[hardware]\nramp_rate = \"2 A\"\n")), Contains("ramp rate"));
  // Turns that cannot fit the declared pack are refused at load, at the wire key.
  CHECK_THAT(message_of(config("wire = \"AWG 10\"")),
             Contains("hw.toml:13:") && Contains("coil 'helm': 100 turns of AWG 10") && Contains("but the pack is 10 mm deep"));
}
