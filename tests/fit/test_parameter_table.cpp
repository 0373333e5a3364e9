// The material-parameter table (src/fit/parameter_names.hpp): each name round-trips to its Material member, its
// unit is the one the plausible ranges and the laws use.
#include <doctest/doctest.h>

#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <set>
#include <span>
#include <vector>
#include <stdexcept>

#include "models/rheology.hpp"
#include "src/fit/fit_problem.hpp"
#include "src/fit/parameter_names.hpp"
#include "src/io/description_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/units.hpp"
#include "fit_test_support.hpp"
#include "src/io/plausible_ranges.hpp"

using namespace spreadfit;

TEST_CASE("parameter table: every name round-trips to its Material member") {
  std::set<std::string_view> names;
  for (const fit::MaterialParameter& p : fit::material_parameters()) {
    CAPTURE(p.name);
    names.insert(p.name);
    REQUIRE(fit::find_material_parameter(p.name) == &p);
    const Material before{3.0, 5.0, 0.7};
    const Material after = fit::with_parameter(before, std::string(p.name), 11.0);
    CHECK(fit::material_value(after, std::string(p.name)) == 11.0);
    CHECK(after.*p.member == 11.0);
    // Only the parameter's own member moves.
    int changed = (after.yield_stress != before.yield_stress) + (after.consistency != before.consistency) +
                  (after.flow_index != before.flow_index);
    CHECK(changed == 1);
    CHECK(fit::parameter_unit(std::string(p.name)) == p.unit);
  }
  CHECK(names.size() == fit::material_parameters().size());
  // A Newtonian viscosity is the consistency K of a flow index of 1 (common practice, no source).
  CHECK(fit::find_material_parameter("viscosity")->member == fit::find_material_parameter("consistency")->member);
  CHECK(fit::find_material_parameter("time_origin") == nullptr);
  CHECK(fit::parameter_unit("time_origin") == "s");
  CHECK(fit::parameter_plain_name("time_origin") == "release time");
  CHECK_THROWS_AS(fit::with_parameter(Material{}, "time_origin", 1.0), std::invalid_argument);
  CHECK_THROWS_AS(fit::material_value(Material{}, "density"), std::invalid_argument);
}

TEST_CASE("parameter table: every law's parameters are in the table") {
  for (Law law : {Law::Newtonian, Law::PowerLaw, Law::Bingham, Law::HerschelBulkley})
    for (const std::string& name : law_parameter_names(law)) {
      CAPTURE(name);
      CHECK(fit::find_material_parameter(name) != nullptr);
    }
}

TEST_CASE("parameter table: units and words agree with the plausible ranges") {
  // SI units of the quantities (SI Brochure, 9th ed.: Pa for stress, Pa s for dynamic viscosity).
  CHECK(fit::find_material_parameter("yield_stress")->unit == io::plausible::yield_stress.unit);
  CHECK(fit::find_material_parameter("viscosity")->unit == io::plausible::viscosity.unit);
  CHECK(fit::find_material_parameter("consistency")->unit == io::plausible::consistency.unit);
  CHECK(fit::find_material_parameter("flow_index")->unit == io::plausible::flow_index.unit);
  CHECK(fit::find_material_parameter("yield_stress")->plain_name == io::plausible::yield_stress.what);
  CHECK(fit::find_material_parameter("flow_index")->plain_name == io::plausible::flow_index.what);
}

TEST_CASE("parameter table: names unique, ids in order, name -> id -> name round trip") {
  std::set<std::string_view> names;
  std::size_t row = 0;
  for (const fit::ParameterInfo& p : fit::parameter_table()) {
    CAPTURE(p.name);
    names.insert(p.name);
    CHECK(std::size_t(p.id) == row++);  // the table is indexed by id
    CHECK(&fit::parameter_info(p.id) == &p);
    REQUIRE(fit::parameter_from_name(p.name).has_value());
    CHECK(*fit::parameter_from_name(p.name) == p.id);
    CHECK(fit::parameter_name(*fit::parameter_from_name(p.name)) == p.name);
    CHECK(fit::is_parameter(p.name, p.id));
    // A material parameter sets a Material member; the release time does not.
    CHECK((p.member != nullptr) == (p.id != fit::Parameter::TimeOrigin));
    CHECK(fit::parameter_plain_name(std::string(p.name)) == p.plain_name);
  }
  CHECK(names.size() == fit::parameter_table().size());
  CHECK(fit::material_parameters().size() == fit::parameter_table().size() - 1);
  CHECK_FALSE(fit::parameter_from_name("density").has_value());
  CHECK_FALSE(fit::parameter_from_name("").has_value());
}

TEST_CASE("parameter table: bounds ordered and finite, positive where searched on the logarithm") {
  for (const fit::ParameterInfo& p : fit::parameter_table()) {
    CAPTURE(p.name);
    if (!p.has_fixed_bounds) {
      // Only the release time takes its box from the readings (FitProblem).
      CHECK(p.id == fit::Parameter::TimeOrigin);
      continue;
    }
    CHECK(std::isfinite(p.fit_lower));
    CHECK(std::isfinite(p.fit_upper));
    CHECK(p.fit_lower < p.fit_upper);
    if (p.log_space) CHECK(p.fit_lower > 0.0);
    // The fit's box lies inside the possible range of an input value, so any fitted value could be given back to
    // simulate (src/io/plausible_ranges.hpp).
    REQUIRE(p.plausible != nullptr);
    CHECK(p.fit_lower >= p.plausible->refuse_below);
    CHECK(p.fit_upper <= p.plausible->refuse_above);
    CHECK(p.plausible->unit == p.unit);
    CHECK(p.plausible->what == p.plain_name);
  }
  // The flow index box ends where the law's validity range ends: n in (0, 2] (models/rheology.hpp validate).
  CHECK(fit::parameter_info(fit::Parameter::FlowIndex).fit_upper == 2.0);
  Material m;
  m.flow_index = fit::parameter_info(fit::Parameter::FlowIndex).fit_upper;
  CHECK_NOTHROW(validate(m));
}

TEST_CASE("parameter table: each unit parses with the units parser as the row's dimension") {
  // A value of 1 written in the unit is 1 in SI: the unit strings are the SI units of their dimensions (SI
  // Brochure, 9th ed.: Pa for stress, Pa s for dynamic viscosity, s for time; the flow index is a pure number).
  for (const fit::ParameterInfo& p : fit::parameter_table()) {
    CAPTURE(p.name);
    if (p.dimension == io::Dimension::Dimensionless) {
      CHECK(io::parse_quantity("1", p.dimension) == 1.0);
      continue;
    }
    CHECK(io::parse_quantity("1 " + std::string(p.unit), p.dimension) == 1.0);
    CHECK(io::si_unit_symbol(p.dimension) == p.unit);
  }
}

TEST_CASE("parameter table: each law's layout") {
  // Herschel-Bulkley (1926) tau = tau_y + K gammadot^n; the other laws fix tau_y = 0 and/or n = 1
  // (models/rheology.hpp), so a law has the yield stress iff it is Bingham or Herschel-Bulkley, the flow index iff
  // it is the power law or Herschel-Bulkley, and K always (named viscosity when n is fixed at 1).
  for (const Law law : all_laws()) {
    CAPTURE(law_name(law));
    const std::span<const fit::Parameter> layout = fit::law_parameters(law);
    const bool has_tau = law == Law::Bingham || law == Law::HerschelBulkley;
    const bool has_n = law == Law::PowerLaw || law == Law::HerschelBulkley;
    std::vector<fit::Parameter> expected;
    if (has_tau) expected.push_back(fit::Parameter::YieldStress);
    expected.push_back(has_n ? fit::Parameter::Consistency : fit::Parameter::Viscosity);
    if (has_n) expected.push_back(fit::Parameter::FlowIndex);
    CHECK(std::vector<fit::Parameter>(layout.begin(), layout.end()) == expected);
    // The same names the models layer gives the law, in the same order.
    const std::vector<std::string> names = law_parameter_names(law);
    REQUIRE(names.size() == layout.size());
    for (std::size_t i = 0; i < layout.size(); ++i) CHECK(names[i] == fit::parameter_name(layout[i]));
  }
}

TEST_CASE("parameter table: the fit's parameter vector and box are the table's") {
  // One series without a release-time fit, so the vector holds the material parameters alone.
  fit::FitSeries series;
  series.setup = testing::plate_setup();
  series.times = {2.0, 4.0, 6.0, 8.0};
  series.values = {0.05, 0.06, 0.065, 0.07};
  fit::FitOptions options;
  options.fit_time_origin = false;
  for (const Law law : all_laws()) {
    CAPTURE(law_name(law));
    const fit::FitProblem problem({series}, law, options);
    const std::span<const fit::Parameter> layout = fit::law_parameters(law);
    REQUIRE(problem.size() == int(layout.size()));
    REQUIRE(problem.material_parameters() == int(layout.size()));
    for (std::size_t i = 0; i < layout.size(); ++i) {
      const fit::ParameterInfo& p = fit::parameter_info(layout[i]);
      CAPTURE(p.name);
      CHECK(problem.names()[i] == p.name);
      const double lo = p.log_space ? std::log(p.fit_lower) : p.fit_lower;
      const double hi = p.log_space ? std::log(p.fit_upper) : p.fit_upper;
      CHECK(problem.lower()[Eigen::Index(i)] == lo);
      CHECK(problem.upper()[Eigen::Index(i)] == hi);
    }
    // The material a parameter vector stands for: each table row's member from its own coordinate.
    Material m{20.0, 3.0, 0.6};
    if (law == Law::Newtonian || law == Law::Bingham) m.flow_index = 1.0;
    if (law == Law::Newtonian || law == Law::PowerLaw) m.yield_stress = 0.0;
    const Material back = problem.material(problem.parameters(m, {}));
    CHECK(back.yield_stress == doctest::Approx(m.yield_stress).epsilon(1e-12));
    CHECK(back.consistency == doctest::Approx(m.consistency).epsilon(1e-12));
    CHECK(back.flow_index == doctest::Approx(m.flow_index).epsilon(1e-12));
  }
}

TEST_CASE("parameter table: the spec keys a catalogue accepts are the table's, each with its example") {
  // Every row marked spec_key is read from a catalogue, with its example as the limits, and the release time,
  // which no spec names, is refused.
  const std::filesystem::path file =
      std::filesystem::temp_directory_path() / ("spreadfit-parameter-table-" + std::to_string(::getpid()) + ".toml");
  std::string toml = "[P1]\n";
  std::vector<std::string_view> expected;
  for (const fit::ParameterInfo& p : fit::parameter_table())
    if (p.spec_key) {
      toml += std::string(p.name) + " = " + std::string(p.spec_example) + "\n";
      expected.push_back(p.name);
    }
  {
    std::ofstream(file) << toml;
  }
  const auto catalogue = io::load_spec_catalogue(file);
  REQUIRE(catalogue.count("P1") == 1);
  const auto& limits = catalogue.at("P1").limits;
  REQUIRE(limits.size() == expected.size());
  for (std::size_t i = 0; i < limits.size(); ++i) {
    CAPTURE(limits[i].parameter);
    CHECK(limits[i].parameter == expected[i]);
    CHECK(limits[i].low > 0.0);
    CHECK(limits[i].low < limits[i].high);
  }
  {
    std::ofstream(file) << "[P1]\n" << fit::parameter_name(fit::Parameter::TimeOrigin) << " = [1, 2]\n";
  }
  CHECK_THROWS_AS(io::load_spec_catalogue(file), io::InputError);
  std::filesystem::remove(file);
}

TEST_CASE("parameter table: each command-line example is a value of its row that --set accepts") {
  // The example --set's messages show must itself be accepted: a quantity of the row's dimension with the row's
  // sign, inside its possible range (src/io/plausible_ranges.hpp), and a material of every law built from the
  // examples must pass the law's own check (models/rheology.hpp validate).
  for (const fit::ParameterInfo& p : fit::parameter_table()) {
    CAPTURE(p.name);
    REQUIRE_FALSE(p.input_example.empty());
    double value = 0;
    REQUIRE_NOTHROW(value = io::parse_quantity(p.input_example, p.dimension, p.input_sign));
    if (p.plausible) CHECK_NOTHROW((void)io::check_plausible(value, *p.plausible, p.input_example));
  }
  for (Law law : all_laws()) {
    CAPTURE(law_name(law));
    Material m{0.0, 1.0, 1.0};
    for (fit::Parameter id : fit::law_parameters(law)) {
      const fit::ParameterInfo& p = fit::parameter_info(id);
      m.*p.member = io::parse_quantity(p.input_example, p.dimension, p.input_sign);
    }
    CHECK_NOTHROW(validate(m));
  }
  // Sign rules (common practice, no source): a yield stress may be zero (Herschel-Bulkley with no yield stress is
  // the power law, DEVELOPERS.md "Materials"); K and the flow index are positive; the release time takes any sign,
  // since a fit may place it before the clock's zero and its result is given back to simulate.
  CHECK(fit::parameter_info(fit::Parameter::YieldStress).input_sign == io::Range::NonNegative);
  CHECK(fit::parameter_info(fit::Parameter::Viscosity).input_sign == io::Range::Positive);
  CHECK(fit::parameter_info(fit::Parameter::Consistency).input_sign == io::Range::Positive);
  CHECK(fit::parameter_info(fit::Parameter::FlowIndex).input_sign == io::Range::Positive);
  CHECK(fit::parameter_info(fit::Parameter::TimeOrigin).input_sign == io::Range::Any);
}
