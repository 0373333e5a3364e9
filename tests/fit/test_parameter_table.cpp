// The material-parameter table (src/fit/parameter_names.hpp): each name round-trips to its Material member, its
// unit is the one the plausible ranges and the laws use.
#include <doctest/doctest.h>

#include <set>
#include <stdexcept>

#include "models/rheology.hpp"
#include "src/fit/parameter_names.hpp"
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
