// The parameter table: every fitted parameter by its interface name (README, "Using it"): yield_stress [Pa],
// viscosity [Pa.s], consistency [Pa.s^n], flow_index [-], and time_origin [s], the release time, which is fitted
// but is not a material property. Every string match on a parameter name, every file-format key (JSON, TOML, SQL
// column) that names one, and every law's parameter layout comes from this one table.
#pragma once

#include <optional>
#include <span>
#include <string>
#include <string_view>

#include "models/rheology.hpp"
#include "src/io/plausible_ranges.hpp"
#include "src/io/units.hpp"

namespace spreadfit::fit {

/// The parameters by id, in the order results list them.
enum class Parameter { YieldStress, Viscosity, Consistency, FlowIndex, TimeOrigin };

/// One row of the table.
struct ParameterInfo {
  Parameter id;
  std::string_view name;        ///< interface name: result JSON, history columns, spec keys
  std::string_view unit;        ///< SI unit as results write it (parses with io::parse_quantity for `dimension`)
  std::string_view plain_name;  ///< the words sentences use
  io::Dimension dimension;      ///< what the units parser reads a value of it as
  /// The Material member it sets (viscosity and consistency are both K, the consistency of a Newtonian law);
  /// nullptr for the release time.
  double Material::*member;
  /// The fit's box [fit_lower, fit_upper] in SI, searched on the logarithm when log_space (common practice for
  /// foods and cosmetics, no source: yield stress 0.01 Pa - 10 kPa, consistency / viscosity 1e-4 - 1e5 Pa s^n,
  /// flow index 0.1 - 2). The release time has no fixed box: it is set from each series' reading times
  /// (FitProblem), so has_fixed_bounds is false there.
  bool has_fixed_bounds;
  double fit_lower;
  double fit_upper;
  bool log_space;
  /// Where a value given as input (simulate, plan, translate) is checked; nullptr when none is.
  const io::PlausibleRange* plausible;
  /// True when a [spec] / [catalogue] key of the test description names it.
  bool spec_key;
  /// An example spec value, as the description reader's messages show it.
  std::string_view spec_example;
};

/// Every row, in the order of Parameter.
std::span<const ParameterInfo> parameter_table();
/// The material parameters (every row but the release time), in the order results list them: yield_stress,
/// viscosity, consistency, flow_index.
std::span<const ParameterInfo> material_parameters();
/// The row of `id`.
const ParameterInfo& parameter_info(Parameter id);
/// The interface name of `id`.
std::string_view parameter_name(Parameter id);
/// The id of an interface name; nullopt for a name that is not a parameter.
std::optional<Parameter> parameter_from_name(std::string_view name);
/// True when `name` is the interface name of `id`.
bool is_parameter(std::string_view name, Parameter id);

/// The parameters of a law in the order of the fit's parameter vector (FitProblem): the yield stress first when the
/// law has one, then K (viscosity or consistency), then the flow index when the law has one.
std::span<const Parameter> law_parameters(Law law);

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
