#pragma once
// Reading a project config (TOML) into a Model, with every error pointing at file:line:column.
#include <filesystem>
#include <optional>
#include <string>
#include <string_view>

#include "coilwright/model.hpp"

namespace coilwright {

// Reads and validates a config file. Throws InputError (file, line, column, key, what was
// found and what is accepted) for any mistake, including coils that intersect each other.
[[nodiscard]] Model load_model(const std::filesystem::path& file);

// The same from text; `source_name` is used in messages and as the base for relative paths
// (a points file of the target is read relative to its folder).
[[nodiscard]] Model parse_model(std::string_view toml_text, const std::string& source_name);

// Throws InputError pointing at the second coil of the first pair of windings found to
// intersect (coaxial circular windings exactly, others by a sampled distance check).
void check_no_intersections(const Model& model);

// Throws InputError pointing at the target's size key (or its points file) when a winding's
// conductor passes through the target region: the field inside a conductor is not modelled.
void check_target_clear(const Model& model);

// One string<->enum table per config enum, used for parsing and for printing back.
[[nodiscard]] std::string_view to_string(RegionKind r) noexcept;
[[nodiscard]] std::optional<RegionKind> region_from_string(std::string_view s) noexcept;
[[nodiscard]] std::string_view to_string(Goal g) noexcept;
[[nodiscard]] std::optional<Goal> goal_from_string(std::string_view s) noexcept;
[[nodiscard]] std::string_view to_string(Objective o) noexcept;
[[nodiscard]] std::optional<Objective> objective_from_string(std::string_view s) noexcept;
// Search algorithms are kept as strings in SearchOptions; these list the accepted names.
[[nodiscard]] bool is_global_algorithm(std::string_view s) noexcept;
[[nodiscard]] bool is_local_algorithm(std::string_view s) noexcept;

}  // namespace coilwright
