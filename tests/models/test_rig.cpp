// The rig table (models/rig.hpp): the defining properties of each rig's kind name, readings, volume and arrest
// relation, which every layer reads instead of its own copy.
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>
#include <set>

#include "models/closed_forms.hpp"
#include "models/rig.hpp"

using namespace spreadfit;

TEST_CASE("rig table: every kind name round-trips to its variant alternative") {
  const auto& names = rig_kind_names();
  REQUIRE(names.size() == std::variant_size_v<Rig>);
  CHECK(std::set<std::string_view>(names.begin(), names.end()).size() == names.size());  // distinct
  for (std::size_t i = 0; i < names.size(); ++i) {
    CAPTURE(names[i]);
    const std::optional<Rig> rig = rig_of_kind(names[i]);
    REQUIRE(rig.has_value());
    CHECK(rig->index() == i);
    CHECK(rig_kind_name(*rig) == names[i]);
  }
  // The names of the test description's [rig] kind (README, "Test description").
  CHECK(rig_kind_name(ChannelRig{}) == "channel");
  CHECK(rig_kind_name(PlateRig{}) == "plate");
  CHECK(rig_kind_name(SqueezeRig{}) == "squeeze");
  CHECK(rig_kind_name(SlumpRig{}) == "slump");
  CHECK_FALSE(rig_of_kind("cone").has_value());
  CHECK_FALSE(rig_of_kind("").has_value());
}

TEST_CASE("rig table: each rig accepts its default reading and every reading has a rig") {
  constexpr Reading all[] = {Reading::Front, Reading::Radius, Reading::Diameter, Reading::Gap, Reading::Slump};
  std::set<Reading> read;
  for (std::string_view name : rig_kind_names()) {
    CAPTURE(name);
    const Rig rig = *rig_of_kind(name);
    CHECK(rig_accepts_reading(rig, default_reading(rig)));
    for (Reading r : all)
      if (rig_accepts_reading(rig, r)) read.insert(r);
    // Only a rig with a curve in time can have a release time fitted; the slump alone reads once, at rest.
    CHECK(rig_is_timed(rig) == (default_reading(rig) != Reading::Slump));
  }
  CHECK(read.size() == std::size(all));
  CHECK_FALSE(rig_accepts_reading(PlateRig{}, Reading::Front));
  CHECK_FALSE(rig_accepts_reading(ChannelRig{}, Reading::Gap));
  CHECK(rig_accepts_reading(SqueezeRig{}, Reading::Diameter));
}

TEST_CASE("rig table: the sample volume of each rig") {
  CHECK(fill_volume(ChannelRig{.width = 0.1, .reservoir_length = 0.05, .volume = 2e-4}) == 2e-4);
  CHECK(fill_volume(PlateRig{.ring_radius = 0.03, .volume = 5e-5}) == 5e-5);
  CHECK(fill_volume(SqueezeRig{.volume = 1e-6, .force = 2.0}) == 1e-6);
  // A cylinder holds pi R^2 H (elementary geometry).
  CHECK(fill_volume(SlumpRig{.radius = 0.05, .height = 0.1}) == doctest::Approx(std::numbers::pi * 0.05 * 0.05 * 0.1));
}

TEST_CASE("rig table: the squeeze arrest relation and its inverse") {
  // Perfectly plastic squeeze limit F = 2 pi tau_y R^3 / (3 h) at constant volume V = pi R^2 h (Engmann, Servais &
  // Burbidge 2005, J. Non-Newt. Fluid Mech. 132, eq. for the plastic limit).
  const double tau = 40.0, force = 2.5, volume = 2e-6;
  const double h = closed_form::squeeze_arrest_gap(tau, force, volume);
  const double R = std::sqrt(volume / (std::numbers::pi * h));
  CHECK(2 * std::numbers::pi * tau * R * R * R / (3 * h) == doctest::Approx(force).epsilon(1e-12));
  CHECK(closed_form::squeeze_yield_stress_from_gap(force, volume, h) == doctest::Approx(tau).epsilon(1e-12));
}

TEST_CASE("rig table: the arrest exponent is that of the plastic-limit relations") {
  // tau_y = 9 rho g A^2 / (8 L^3) on a channel and 225 rho g V^2 / (128 pi^2 R^5) on a plate (Roussel & Coussot
  // 2005, J. Rheol. 49): d ln tau_y / d ln extent = -3 and -5.
  const double rho_g = 1000 * standard_gravity, e = 1e-4;
  auto slope = [&](auto tau_of) { return (std::log(tau_of(0.2 * (1 + e))) - std::log(tau_of(0.2 * (1 - e)))) /
                                         (std::log(1 + e) - std::log(1 - e)); };
  const double channel = -slope([&](double L) { return closed_form::planar_yield_stress_from_length(rho_g, 1e-3, L); });
  const double plate =
      -slope([&](double R) { return closed_form::axisymmetric_yield_stress_from_radius(rho_g, 1e-4, R); });
  REQUIRE(arrest_extent_exponent(ChannelRig{}).has_value());
  REQUIRE(arrest_extent_exponent(PlateRig{}).has_value());
  CHECK(*arrest_extent_exponent(ChannelRig{}) == doctest::Approx(channel).epsilon(1e-6));
  CHECK(*arrest_extent_exponent(PlateRig{}) == doctest::Approx(plate).epsilon(1e-6));
  CHECK_FALSE(arrest_extent_exponent(SqueezeRig{}).has_value());
  CHECK_FALSE(arrest_extent_exponent(SlumpRig{}).has_value());
}
