#include "models/temperature.hpp"

#include <cmath>
#include <stdexcept>

namespace spreadfit {

double arrhenius_factor(double activation_energy, double temperature, double reference_temperature) {
  if (!(temperature > 0) || !(reference_temperature > 0))
    throw std::invalid_argument("arrhenius_factor: temperatures must be > 0 K");
  return std::exp(activation_energy / molar_gas_constant * (1.0 / reference_temperature - 1.0 / temperature));
}

}  // namespace spreadfit
