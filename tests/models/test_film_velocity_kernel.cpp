// The film velocity kernel of the thin-film right-hand side (models/film_velocity_kernel.hpp) against the
// Herschel-Bulkley film flux written out in models/rheology.cpp (Liu & Mei 1989; Balmforth et al. 2006): the
// kernel takes the material's constants out of the loop and multiplies by inverses, so it must agree with the
// formula to rounding, and its derivatives with central differences of itself.
#include <doctest/doctest.h>

#include <cmath>

#include "models/film_velocity_kernel.hpp"
#include "models/rheology.hpp"

using namespace spreadfit;

TEST_CASE("the film velocity kernel is the Herschel-Bulkley film flux over the depth, to rounding") {
  const Material materials[] = {{0.0, 5.0, 1.0}, {0.0, 10.0, 0.4}, {30.0, 2.0, 1.0}, {20.0, 10.0, 0.4},
                                {5.0, 0.3, 0.25}, {60.0, 30.0, 1.6}};
  double worst = 0.0;
  int yielded = 0;
  for (const Material& m : materials) {
    const FilmVelocityKernel kernel(m);
    for (double h = 1e-4; h < 0.05; h *= 1.37)
      for (double G = 10.0; G < 1e7; G *= 1.91) {
        const double q = film_flux(m, G, h);
        const double u = kernel.velocity(G, h);
        if (q == 0.0) {
          CHECK(u == 0.0);  // unyielded: no flow in either
          continue;
        }
        ++yielded;
        worst = std::max(worst, std::abs(u * h / q - 1.0));
      }
  }
  INFO("worst relative difference " << worst << " over " << yielded << " yielded points");
  CHECK(yielded > 500);
  CHECK(worst < 1e-13);
}

TEST_CASE("the film velocity kernel's derivatives are those of its velocity") {
  for (const Material& m : {Material{0.0, 10.0, 0.4}, Material{20.0, 10.0, 0.4}, Material{30.0, 2.0, 1.0}}) {
    const FilmVelocityKernel kernel(m);
    for (double h : {2e-3, 1e-2, 3e-2})
      for (double G : {3e3, 1e4, 1e5}) {
        const FilmVelocity d = kernel.with_derivatives(G, h);
        if (d.u == 0.0) continue;
        const auto relative = [](double a, double b) { return std::abs(a - b) / std::abs(b); };
        CHECK(relative(d.u, kernel.velocity(G, h)) < 1e-13);
        const double eG = 1e-6 * G, eh = 1e-6 * h;  // central differences, relative error O(1e-10)
        const double dG = (kernel.velocity(G + eG, h) - kernel.velocity(G - eG, h)) / (2 * eG);
        const double dh = (kernel.velocity(G, h + eh) - kernel.velocity(G, h - eh)) / (2 * eh);
        INFO("tau_y " << m.yield_stress << ", n " << m.flow_index << ", G " << G << ", h " << h);
        CHECK(relative(d.du_dG, dG) < 1e-6);
        CHECK(relative(d.du_dh, dh) < 1e-6);
      }
  }
}
