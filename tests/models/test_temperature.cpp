// Arrhenius temperature shift (models/temperature.hpp) against handbook viscosities of glycerol.
#include <doctest/doctest.h>

#include <cmath>
#include <stdexcept>

#include "models/temperature.hpp"

using namespace spreadfit;

TEST_CASE("the Arrhenius shift reproduces glycerol's viscosity between its handbook points") {
  // Glycerol (anhydrous) viscosity, Segur & Oberstar (1951), Ind. Eng. Chem. 43 (from memory): 1.412 Pa s at
  // 20 degC, 0.612 Pa s at 30 degC, 0.284 Pa s at 40 degC. An activation energy from the 20 and 40 degC points
  // must predict the 30 degC value; Arrhenius is an approximation for glycerol, so within 3%.
  const double T20 = 293.15, T30 = 303.15, T40 = 313.15;
  const double Ea = molar_gas_constant * std::log(1.412 / 0.284) / (1.0 / T20 - 1.0 / T40);
  CHECK(Ea == doctest::Approx(61.2e3).epsilon(0.01));  // the same data give about 61 kJ/mol
  // arrhenius_factor takes a value at T to T_ref: from 20 degC to 30 degC, and back.
  CHECK(1.412 * arrhenius_factor(Ea, T20, T30) == doctest::Approx(0.612).epsilon(0.03));
  CHECK(0.612 * arrhenius_factor(Ea, T30, T20) == doctest::Approx(1.412).epsilon(0.03));
  // Exact limits of the law itself: no shift at the reference or without an activation energy, and composition.
  CHECK(arrhenius_factor(Ea, T30, T30) == 1.0);
  CHECK(arrhenius_factor(0.0, T20, T40) == 1.0);
  CHECK(arrhenius_factor(Ea, T20, T30) * arrhenius_factor(Ea, T30, T40) ==
        doctest::Approx(arrhenius_factor(Ea, T20, T40)).epsilon(1e-12));
  CHECK_THROWS_AS(arrhenius_factor(Ea, 0.0, T20), std::invalid_argument);
}
