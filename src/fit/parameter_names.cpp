#include "src/fit/parameter_names.hpp"

#include <stdexcept>

namespace spreadfit::fit {

const MaterialParameter* find_material_parameter(std::string_view name) {
  for (const MaterialParameter& p : material_parameters())
    if (p.name == name) return &p;
  return nullptr;
}

std::string parameter_unit(const std::string& name) {
  const std::optional<Parameter> id = parameter_from_name(name);
  return std::string(parameter_info(id.value_or(Parameter::TimeOrigin)).unit);  // the release time otherwise
}

std::string parameter_plain_name(const std::string& name) {
  if (const std::optional<Parameter> id = parameter_from_name(name)) return std::string(parameter_info(*id).plain_name);
  return name;
}

namespace {
const MaterialParameter& material_parameter(const std::string& name) {
  const MaterialParameter* p = find_material_parameter(name);
  if (!p) throw std::invalid_argument("'" + name + "' is not a material parameter");
  return *p;
}
}  // namespace

Material with_parameter(Material material, const std::string& name, double value) {
  material.*material_parameter(name).member = value;
  return material;
}

double material_value(const Material& material, const std::string& name) {
  return material.*material_parameter(name).member;
}

}  // namespace spreadfit::fit
