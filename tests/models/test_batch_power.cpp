// Batched powers of positive numbers (models/batch_power.hpp) against the C library's scalar pow, which glibc
// documents within 1 ulp of the exact value (glibc manual, "Errors in Math Functions"). The batched form is
// exp(a log x): its absolute error in a log x is a few ulp of |a log x|, so the relative error of the power is
// allowed 8 ulp times (1 + |a log x|). Every count from 0 to 9 covers whole groups of four and the remainders,
// written to a separate array and in place.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <random>
#include <vector>

#include "models/batch_power.hpp"

using namespace spreadfit;

TEST_CASE("batched powers agree with the C library's pow, in place or not, for every remainder of four") {
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> log10_x(-8.0, 4.0);  // film depths and stress ratios span these decades
  const double exponents[] = {-2.5, -1.0, 0.4, 1.0, 1.0 / 0.4, 3.0, 4.5};
  const double eps = std::numeric_limits<double>::epsilon();
  double worst = 0.0;  // in units of the allowance
  for (double a : exponents)
    for (std::size_t count = 0; count <= 9; ++count)
      for (int in_place = 0; in_place < 2; ++in_place) {
        std::vector<double> x(count), y(count, -1.0);
        for (double& v : x) v = std::pow(10.0, log10_x(rng));
        const std::vector<double> original = x;
        double* out = in_place ? x.data() : y.data();
        positive_powers(x.data(), a, out, count);
        for (std::size_t i = 0; i < count; ++i) {
          const double reference = std::pow(original[i], a);
          const double allowed = 8.0 * eps * (1.0 + std::abs(a * std::log(original[i])));
          const double relative = std::abs(out[i] - reference) / reference;
          worst = std::max(worst, relative / allowed);
          CHECK(relative <= allowed);
        }
        if (!in_place)
          for (std::size_t i = 0; i < count; ++i) CHECK(x[i] == original[i]);  // the input is left alone
      }
  MESSAGE("worst error " << worst << " of the allowance; vectorised: " << positive_powers_vectorised());
}

TEST_CASE("a batched power of one is one and of an exponent zero is one") {
  // x^0 = 1 and 1^a = 1 exactly in exact arithmetic (defining property); exp(0) and log(1) are exact in glibc.
  std::vector<double> ones(6, 1.0), x{0.3, 2.0, 7.5, 1e-5, 123.0, 0.9};
  positive_powers(ones.data(), 2.7, ones.data(), ones.size());
  for (double v : ones) CHECK(v == 1.0);
  positive_powers(x.data(), 0.0, x.data(), x.size());
  for (double v : x) CHECK(v == 1.0);
}
