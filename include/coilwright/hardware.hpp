#pragma once
// Everything a builder needs about a design's hardware, gathered per winding and per circuit:
// wire, winding, resistance, power, inductance, forces, heat, supply checks, cautions and the
// winding schedule. The report is computed without I/O; hardware_json and
// format_winding_schedule present it.
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json_fwd.hpp>

#include "coilwright/electrical.hpp"
#include "coilwright/forces.hpp"
#include "coilwright/hardware_options.hpp"
#include "coilwright/inductance.hpp"
#include "coilwright/supply.hpp"
#include "coilwright/thermal.hpp"
#include "coilwright/winding.hpp"
#include "coilwright/wire.hpp"

namespace coilwright {

struct Model;

// One physical winding (a pair gives two).
struct CoilHardware {
  std::string name;                 // the coil's name (both halves of a pair carry it)
  int winding = 1;                  // 1, or 2 for the second half of a pair
  std::size_t coil = 0;             // index into Model::coils
  std::size_t circuit = 0;          // index into Model::circuits
  double sign = 1.0;                // -1: the opposed half of a pair
  Vec3 centre_m = Vec3::Zero();
  std::optional<Wire> wire;
  std::optional<WindingPack> pack;               // absent without a wire
  std::optional<ConductorFigures> conductor;     // absent without a wire
  std::optional<DriveFigures> drive;             // at the hot temperature; absent without a wire
  std::optional<double> temperature_rise_K;      // steady, constant current; absent without a wire or in runaway
  std::optional<double> self_inductance_H;       // absent without a wire
  std::optional<RadialLoad> radial;              // circular windings with a wire
  WindingForce force;                            // from all other windings
  Vec3 field_constant_T_per_A = Vec3::Zero();    // field of the whole coil at its centre (pair: midpoint) per ampere
  std::string polarity;                          // which way the current runs, seen from where
  std::optional<std::string> error;              // why the figures are missing (e.g. the turns do not fit)
};

struct CircuitHardware {
  std::string name;
  double current_A = 0.0;
  std::optional<double> resistance_20C_ohm;     // DC, all windings in series
  std::optional<double> resistance_hot_ohm;     // at the predicted (or stated) winding temperature
  std::optional<double> voltage_V;              // I R_hot
  std::optional<double> power_W;                // I^2 R_hot
  std::optional<double> inductance_H;           // circuit self-inductance, mutual terms of its windings included
  std::optional<double> time_constant_s;        // L / R_hot
  std::optional<double> stored_energy_J;        // 1/2 I sum_j L_ij I_j: its share of the total
  std::optional<CircuitThermal> constant_current;  // how much the voltage must rise as it warms
  std::optional<CircuitThermal> constant_voltage;  // how much the current (field) falls as it warms
  std::optional<AcDrive> ac;                    // at options.frequency_Hz
  std::optional<double> ramp_voltage_V;         // at options.ramp_rate_A_per_s
  std::optional<double> switch_off_voltage_1ms_V;  // L I / 1 ms: what breaking the current in 1 ms induces
  std::optional<Supply> supply;
};

// Wire to order, per wire size.
struct BillLine {
  std::string wire;
  double length_m = 0.0;        // wound plus leads
  double mass_kg = 0.0;
  double order_length_m = 0.0;  // with the spare allowance
  double order_mass_kg = 0.0;
};

struct Caution {
  enum class Level { note, warning } level = Level::note;
  std::string text;
};

struct HardwareReport {
  HardwareOptions options;
  std::vector<CoilHardware> coils;        // model.coils x windings(coil)
  std::vector<CircuitHardware> circuits;  // model order
  InductanceMatrix inductance;            // between circuits
  std::optional<double> stored_energy_J;  // 1/2 I^T L I
  std::vector<BillLine> bill;
  SupplyCheck supplies;
  std::optional<double> exposure_distance_m;  // from `exposure_centre_m`, beyond which |B| < threshold
  Vec3 exposure_centre_m = Vec3::Zero();
  std::vector<Caution> cautions;
  [[nodiscard]] bool has_warnings() const noexcept;
};

// Gathers the figures for the model's circuits at their currents (Circuit::current_A).
[[nodiscard]] HardwareReport hardware_report(const Model& model, const HardwareOptions& options);
// The same with the model's own [hardware] settings.
[[nodiscard]] HardwareReport hardware_report(const Model& model);

// JSON keys for `evaluate --json`: "circuits", "inductance_matrix", "coils" (see README), plus "stored_energy", "bill_of_materials", "cautions", "exposure".
[[nodiscard]] nlohmann::json hardware_json(const HardwareReport& report);

// The winding schedule as a readable plain-text table (with the cautions).
[[nodiscard]] std::string format_winding_schedule(const HardwareReport& report);

}  // namespace coilwright
