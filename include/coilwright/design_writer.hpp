#pragma once
// Writing a model back as a complete config: a finished design that every command can reload.
#include <string>
#include <string_view>

#include "coilwright/model.hpp"

namespace coilwright {

// The version of the design file layout written by write_model_toml.
inline constexpr int design_format_version = 1;

// The model as a TOML config that parse_model reads back to an equal model: free parameters
// and solved currents are written as fixed values (the design), [target] and [search] are kept
// so the design re-evaluates on its target. Doubles are written with 17 significant digits.
[[nodiscard]] std::string write_model_toml(const Model& model);

// `s` as a TOML basic string, quotes included ("a \"b\"\n").
[[nodiscard]] std::string toml_quoted(std::string_view s);

}  // namespace coilwright
