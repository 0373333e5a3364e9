#include "src/fit/parameter_names.hpp"

#include <stdexcept>

namespace spreadfit::fit {

const std::array<MaterialParameter, 4>& material_parameters() {
  static const std::array<MaterialParameter, 4> table{{
      {"yield_stress", "Pa", "yield stress", &Material::yield_stress},
      {"viscosity", "Pa.s", "viscosity", &Material::consistency},
      {"consistency", "Pa.s^n", "consistency", &Material::consistency},
      {"flow_index", "-", "flow index", &Material::flow_index},
  }};
  return table;
}

const MaterialParameter* find_material_parameter(std::string_view name) {
  for (const MaterialParameter& p : material_parameters())
    if (p.name == name) return &p;
  return nullptr;
}

std::string parameter_unit(const std::string& name) {
  const MaterialParameter* p = find_material_parameter(name);
  return p ? std::string(p->unit) : "s";  // the release time, time_origin
}

std::string parameter_plain_name(const std::string& name) {
  if (const MaterialParameter* p = find_material_parameter(name)) return std::string(p->plain_name);
  if (name == "time_origin") return "release time";
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
