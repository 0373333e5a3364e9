// The parameter table: every fitted parameter by its interface name (README, "Using it"): yield_stress [Pa],
// viscosity [Pa.s], consistency [Pa.s^n], flow_index [-], and time_origin [s], the release time, which is fitted
// but is not a material property. Every string match on a parameter name, every file-format key (JSON, TOML, SQL
// column) that names one, and every law's parameter layout comes from this one table. It sits in io, the lowest
// layer of src/, because the test description's spec keys and the units of its values come from it too; the fit
// layer's view of it (Material setters, units and words by name) is src/fit/parameter_names.hpp.
#pragma once

#include <optional>
#include <span>
#include <string_view>

#include "models/rheology.hpp"
#include "src/io/plausible_ranges.hpp"
#include "src/io/units.hpp"

namespace spreadfit::io {

/// The parameters by id, in the order results list them.
enum class Parameter { YieldStress, Viscosity, Consistency, FlowIndex, TimeOrigin };

/// One row of the table.
struct ParameterInfo {
  Parameter id;
  std::string_view name;        ///< interface name: result JSON, history columns, spec keys
  std::string_view unit;        ///< SI unit as results write it (parses with io::parse_quantity for `dimension`)
  std::string_view plain_name;  ///< the words sentences use
  Dimension dimension;      ///< what the units parser reads a value of it as
  /// The Material member it sets (viscosity and consistency are both K, the consistency of a Newtonian law);
  /// nullptr for the release time.
  double Material::*member;
  /// The fit's box [fit_lower, fit_upper] in SI, searched on the logarithm when log_space (common practice for
  /// foods and cosmetics, no source: yield stress 0.01 Pa - 10 kPa, consistency / viscosity 1e-4 - 1e5 Pa s^n,
  /// flow index 0.1 - 2). The release time has no fixed box: it is set from each series' reading times
  /// (src/fit/fit_problem.cpp), so has_fixed_bounds is false there.
  bool has_fixed_bounds;
  double fit_lower;
  double fit_upper;
  bool log_space;
  /// Its possible and usual range (the fit's box lies inside it); nullptr when it has none. The command line
  /// (simulate, plan, translate) checks the values it is given against it, except the flow index's, which the
  /// law's own bound (models/rheology.hpp validate) checks.
  const PlausibleRange* plausible;
  /// True when a [spec] / [catalogue] key of the test description names it.
  bool spec_key;
  /// An example spec value, as the description reader's messages show it.
  std::string_view spec_example;
  /// The signs a value given on the command line (--set, --vary) may take, judged on its SI value.
  Range input_sign;
  /// An example value as --set takes it, as the command line's messages show it.
  std::string_view input_example;
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

/// The parameters of a law in the order of the fit's parameter vector (src/fit/fit_problem.cpp): the yield stress first when the
/// law has one, then K (viscosity or consistency), then the flow index when the law has one.
std::span<const Parameter> law_parameters(Law law);

}  // namespace spreadfit::io
