// The material parameters by their interface names (README, "Using it"): yield_stress [Pa], viscosity [Pa.s],
// consistency [Pa.s^n], flow_index [-]; time_origin [s] is the release time, not a material property.
#pragma once

#include <array>
#include <string>
#include <string_view>

#include "models/rheology.hpp"

namespace spreadfit::fit {

/// One material parameter: the name the interface uses, the unit results write, the words sentences use, and the
/// Material member it sets (viscosity and consistency are both K, the consistency of a Newtonian law).
struct MaterialParameter {
  std::string_view name;
  std::string_view unit;
  std::string_view plain_name;
  double Material::*member;
};

/// The material parameters in the order results list them: yield_stress, viscosity, consistency, flow_index.
const std::array<MaterialParameter, 4>& material_parameters();
/// The row of `name`; nullptr for a name that is not a material parameter (time_origin among them).
const MaterialParameter* find_material_parameter(std::string_view name);

/// Unit of a parameter as results write it: Pa, Pa.s, Pa.s^n, - (flow index) or s (release time).
std::string parameter_unit(const std::string& name);
/// The parameter in words: "yield stress", "flow index", "release time" for time_origin; else the name.
std::string parameter_plain_name(const std::string& name);

/// `material` with the parameter `name` set to `value` in SI (viscosity and consistency are both K). Throws
/// std::invalid_argument for a name that is not a material parameter.
Material with_parameter(Material material, const std::string& name, double value);
/// The value of the parameter `name` in `material`. Throws std::invalid_argument for a name that is not a material
/// parameter.
double material_value(const Material& material, const std::string& name);

}  // namespace spreadfit::fit
