// The material parameters by their interface names (README, "Using it"): yield_stress [Pa], viscosity [Pa.s],
// consistency [Pa.s^n], flow_index [-]; time_origin [s] is the release time, not a material property.
#pragma once

#include <string>

#include "models/rheology.hpp"

namespace spreadfit {

/// Unit of a parameter as results write it: Pa, Pa.s, Pa.s^n, - (flow index) or s (release time).
std::string parameter_unit(const std::string& name);

/// `material` with the parameter `name` set to `value` in SI (viscosity and consistency are both K). Throws
/// std::invalid_argument for a name that is not a material parameter.
Material with_parameter(Material material, const std::string& name, double value);

}  // namespace spreadfit
