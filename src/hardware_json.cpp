#include <cmath>

#include <nlohmann/json.hpp>

#include "coilwright/hardware.hpp"

namespace coilwright {

namespace {
using nlohmann::json;

json opt(const std::optional<double>& v) { return v && std::isfinite(*v) ? json(*v) : json(nullptr); }
json vec(const Vec3& v) { return json::array({v.x(), v.y(), v.z()}); }
}  // namespace

json hardware_json(const HardwareReport& r) {
  json circuits = json::array();
  for (const auto& c : r.circuits) {
    json j{{"name", c.name},
           {"current", c.current_A},
           {"resistance", opt(c.resistance_20C_ohm)},
           {"resistance_hot", opt(c.resistance_hot_ohm)},
           {"voltage", opt(c.voltage_V)},
           {"power", opt(c.power_W)},
           {"time_constant", opt(c.time_constant_s)},
           {"stored_energy", opt(c.stored_energy_J)},
           {"inductance", opt(c.inductance_H)}};
    if (c.constant_voltage) j["field_drop_constant_voltage"] = c.constant_voltage->change;
    if (c.constant_current) j["voltage_rise_constant_current"] = c.constant_current->change;
    if (c.ac)
      j["ac"] = {{"frequency", r.options.frequency_Hz.value_or(0.0)}, {"reactance", c.ac->reactance_ohm},
                 {"impedance", c.ac->impedance_ohm}, {"voltage", c.ac->voltage_V},
                 {"resonance_capacitance", c.ac->resonance_capacitance_F}, {"capacitor_voltage", c.ac->capacitor_voltage_V}};
    if (c.ramp_voltage_V) j["ramp_voltage"] = *c.ramp_voltage_V;
    circuits.push_back(std::move(j));
  }
  json matrix = json::array();
  for (Eigen::Index i = 0; i < r.inductance.henry.rows(); ++i) {
    json row = json::array();
    for (Eigen::Index j = 0; j < r.inductance.henry.cols(); ++j) row.push_back(opt(r.inductance.henry(i, j)));
    matrix.push_back(std::move(row));
  }
  json coils = json::array();
  for (const auto& c : r.coils) {
    json j{{"name", c.name},
           {"winding", c.winding},
           {"wire", c.wire ? json(c.wire->label) : json(nullptr)},
           {"wire_length", c.conductor ? json(c.conductor->wire_length_m) : json(nullptr)},
           {"mass", c.conductor ? json(c.conductor->mass_kg) : json(nullptr)},
           {"temperature_rise", opt(c.temperature_rise_K)},
           {"force", vec(c.force.force_N)},
           {"torque", vec(c.force.torque_Nm)},
           {"self_inductance", opt(c.self_inductance_H)},
           {"field_constant", vec(c.field_constant_T_per_A)}};
    if (c.pack) {
      j["turns"] = c.pack->turns;
      j["layers"] = c.pack->layers;
      j["turns_per_layer"] = c.pack->turns_per_layer;
      j["fill_factor"] = c.pack->fill_factor;
    }
    if (c.conductor) j["resistance"] = c.conductor->resistance_20C_ohm;
    if (c.radial) j["radial_pressure"] = c.radial->pressure_Pa;
    if (c.error) j["error"] = *c.error;
    coils.push_back(std::move(j));
  }
  json bill = json::array();
  for (const auto& b : r.bill)
    bill.push_back({{"wire", b.wire}, {"length", b.length_m}, {"mass", b.mass_kg}, {"order_length", b.order_length_m},
                    {"order_mass", b.order_mass_kg}, {"spare", r.options.spare_fraction}});
  json cautions = json::array();
  for (const auto& c : r.cautions)
    cautions.push_back({{"level", c.level == Caution::Level::warning ? "warning" : "note"}, {"text", c.text}});
  json out{{"circuits", std::move(circuits)},
           {"inductance_matrix", std::move(matrix)},
           {"coils", std::move(coils)},
           {"stored_energy", opt(r.stored_energy_J)},
           {"bill_of_materials", std::move(bill)},
           {"cautions", std::move(cautions)}};
  out["exposure"] = {{"threshold", r.options.exposure_threshold_T},
                     {"centre", vec(r.exposure_centre_m)},
                     {"distance", opt(r.exposure_distance_m)}};
  return out;
}

}  // namespace coilwright
