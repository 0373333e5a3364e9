// The fit layer's view of the parameter table (src/io/parameter_table.hpp): Material setters, units and words by
// interface name.
#pragma once

#include <string>
#include <string_view>

#include "models/rheology.hpp"
#include "src/io/parameter_table.hpp"

namespace spreadfit::fit {

using io::law_parameters;
using io::material_parameters;
using io::Parameter;
using io::parameter_from_name;
using io::parameter_info;
using io::parameter_name;
using io::parameter_table;
using io::ParameterInfo;
using io::is_parameter;

/// A material parameter's row (the pre-existing name of ParameterInfo for rows with a Material member).
using MaterialParameter = ParameterInfo;
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
