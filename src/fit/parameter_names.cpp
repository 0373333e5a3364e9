#include "src/fit/parameter_names.hpp"

#include <stdexcept>

namespace spreadfit {

std::string parameter_unit(const std::string& name) {
  if (name == "yield_stress") return "Pa";
  if (name == "viscosity") return "Pa.s";
  if (name == "consistency") return "Pa.s^n";
  if (name == "flow_index") return "-";
  return "s";
}

Material with_parameter(Material material, const std::string& name, double value) {
  if (name == "yield_stress")
    material.yield_stress = value;
  else if (name == "viscosity" || name == "consistency")
    material.consistency = value;
  else if (name == "flow_index")
    material.flow_index = value;
  else
    throw std::invalid_argument("'" + name + "' is not a material parameter");
  return material;
}

}  // namespace spreadfit
