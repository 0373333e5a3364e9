#include "src/io/parameter_table.hpp"

#include <array>
#include <stdexcept>

namespace spreadfit::io {

namespace {
// time_origin may take any sign on the command line: a fit can place the release before the clock's zero, and its
// result is meant to be pasted back into simulate.
constexpr std::array<ParameterInfo, 5> kTable{{
    {Parameter::YieldStress, "yield_stress", "Pa", "yield stress", Dimension::Stress, &Material::yield_stress, true,
     1e-2, 1e4, true, &plausible::yield_stress, true, "[\"20 Pa\", \"35 Pa\"]",
     Range::NonNegative, "25 Pa"},
    {Parameter::Viscosity, "viscosity", "Pa.s", "viscosity", Dimension::Viscosity, &Material::consistency, true, 1e-4,
     1e5, true, &plausible::viscosity, true, "[\"0.8 Pa.s\", \"1.5 Pa.s\"]",
     Range::Positive, "1.2 Pa.s"},
    {Parameter::Consistency, "consistency", "Pa.s^n", "consistency", Dimension::Consistency, &Material::consistency,
     true, 1e-4, 1e5, true, &plausible::consistency, true, "[\"2 Pa.s^n\", \"12 Pa.s^n\"]",
     Range::Positive, "8 Pa.s^n"},
    {Parameter::FlowIndex, "flow_index", "-", "flow index", Dimension::Dimensionless, &Material::flow_index, true,
     0.1, 2.0, true, &plausible::flow_index, true, "[0.3, 0.6]", Range::Positive,
     "0.5"},
    {Parameter::TimeOrigin, "time_origin", "s", "release time", Dimension::Time, nullptr, false, 0.0, 0.0, false,
     nullptr, false, "", Range::Any, "2 s"},
}};
// The table is indexed by id.
static_assert(std::size_t(Parameter::TimeOrigin) == kTable.size() - 1);

constexpr std::array kNewtonian{Parameter::Viscosity};
constexpr std::array kPowerLaw{Parameter::Consistency, Parameter::FlowIndex};
constexpr std::array kBingham{Parameter::YieldStress, Parameter::Viscosity};
constexpr std::array kHerschelBulkley{Parameter::YieldStress, Parameter::Consistency, Parameter::FlowIndex};
}  // namespace

std::span<const ParameterInfo> parameter_table() { return kTable; }

std::span<const ParameterInfo> material_parameters() { return parameter_table().first(kTable.size() - 1); }

const ParameterInfo& parameter_info(Parameter id) { return kTable[std::size_t(id)]; }

std::string_view parameter_name(Parameter id) { return parameter_info(id).name; }

std::optional<Parameter> parameter_from_name(std::string_view name) {
  for (const ParameterInfo& p : kTable)
    if (p.name == name) return p.id;
  return std::nullopt;
}

bool is_parameter(std::string_view name, Parameter id) { return name == parameter_name(id); }

std::span<const Parameter> law_parameters(Law law) {
  switch (law) {
    case Law::Newtonian: return kNewtonian;
    case Law::PowerLaw: return kPowerLaw;
    case Law::Bingham: return kBingham;
    case Law::HerschelBulkley: return kHerschelBulkley;
  }
  throw std::invalid_argument("unknown law");
}

}  // namespace spreadfit::io
