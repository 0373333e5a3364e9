#include "src/fit/final_only.hpp"

#include <boost/math/tools/roots.hpp>
#include <cmath>
#include <limits>
#include <fmt/format.h>
#include <numbers>
#include <string>

#include "models/closed_forms.hpp"
#include "models/slump.hpp"
#include "src/fit/parameter_names.hpp"

namespace spreadfit::fit {

namespace {
using std::numbers::pi;
constexpr double default_sigma = 1e-3;  // a ruler read to the millimetre (common practice, no source)
}  // namespace

std::optional<std::string> partial_yield(const TestSetup& setup, double reading) {
  // The relation assumes the whole sample yielded into the plastic profile. That profile is taller at its root
  // than the sample was when released unless it reaches far enough: on the channel its wall height 3A/(2L) is at
  // most the block's A/L0 from L = 1.5 L0 on; on the plate its centre height 15V/(8 pi R^2) is at most the
  // cylinder's V/(pi R0^2) from R = sqrt(15/8) R0 on. A shorter arrest is a sample that yielded only in part,
  // stiffer than the relation says (the thin-film model's arrested extents hold the relation within 1% beyond
  // those lengths and fall short of it inside them, tests/fit/test_final_only.cpp): the reading bounds the yield
  // stress from below only.
  // The smallest reading, in the rig's own terms, that the relation holds at.
  const std::optional<double> needed = std::visit(
      overloaded{[&](const ChannelRig& c) -> std::optional<double> { return 0.5 * c.reservoir_length; },
                 [&](const PlateRig& p) -> std::optional<double> {
                   return std::sqrt(15.0 / 8.0) * p.ring_radius * (setup.reading == Reading::Diameter ? 2.0 : 1.0);
                 },
                 [](const auto&) -> std::optional<double> { return std::nullopt; }},
      setup.rig);
  if (!needed || reading >= *needed) return std::nullopt;
  return fmt::format(
      "the sample stopped too soon for all of it to have yielded (the plastic-limit relation needs a {} of at "
      "least {:.3g} mm): the reading gives only a lower bound on the yield stress",
      reading_name(setup.reading), *needed * 1e3);
}

FitResult fit_final_reading(const TestSetup& setup, double reading, std::optional<double> sigma) {
  FitResult out;
  out.law = Law::Bingham;
  out.points = 1;
  out.sigma = sigma.value_or(default_sigma);
  const double rho_g = setup.density * setup.gravity;
  double tau = 0, dlog_tau = 0;  // estimate and |d ln tau / d reading|
  // The rig's plastic-limit (arrest) relation, tau and |d ln tau / d reading|; false when the reading gives none.
  const bool estimated = std::visit(
      overloaded{
          [&](const ChannelRig& c) {
            const double L = c.reservoir_length + reading;
            tau = closed_form::planar_yield_stress_from_length(rho_g, c.volume / c.width, L);
            dlog_tau = 3.0 / L;
            return true;
          },
          [&](const PlateRig& p) {
            const double R = setup.reading == Reading::Diameter ? reading / 2 : reading;
            tau = closed_form::axisymmetric_yield_stress_from_radius(rho_g, p.volume, R);
            dlog_tau = 5.0 / R * (setup.reading == Reading::Diameter ? 0.5 : 1.0);
            return true;
          },
          [&](const SqueezeRig& s) {
            double h = reading, dh = 1.0;  // gap and d gap / d reading
            if (setup.reading != Reading::Gap) {
              const double R = setup.reading == Reading::Diameter ? reading / 2 : reading;
              h = s.volume / (pi * R * R);
              dh = 2.0 * h / R * (setup.reading == Reading::Diameter ? 0.5 : 1.0);
            }
            tau = closed_form::squeeze_yield_stress_from_gap(s.force, s.volume, h);
            dlog_tau = 2.5 / h * dh;
            return true;
          },
          [&](const SlumpRig& rig) {
            if (!(reading > 0) || reading >= rig.height) {
              out.status = FitStatus::NotIdentifiable;
              out.reason = reading > 0 ? "the sample collapsed completely: a slump test gives no yield stress then"
                                       : "no slump: the yield stress is only bounded from below (tau_y >= rho g H0 / 2)";
              return false;
            }
            auto slump_at = [&](double log_tau) {
              return predict_slump(rig, Material{std::exp(log_tau), 1.0, 1.0}, setup.density, setup.gravity).slump -
                     reading;
            };
            // The slump falls monotonically from H0 to 0 as tau_y rises to rho g H0 / 2: bracket in log tau.
            const double top = std::log(0.5 * rho_g * rig.height);
            boost::math::tools::eps_tolerance<double> tol(40);
            std::uintmax_t iterations = 100;
            const auto [a, b] = boost::math::tools::toms748_solve(slump_at, top - 25.0, top, tol, iterations);
            const double x = 0.5 * (a + b);
            tau = std::exp(x);
            const double h = 1e-4;
            dlog_tau = std::abs(1.0 / ((slump_at(x + h) - slump_at(x - h)) / (2 * h)));
            return true;
          }},
      setup.rig);
  if (!estimated) return out;
  // Surface tension shortens the final spread of a thin layer (Roussel, Stefani & Leroy 2005, Cem. Concr. Res.
  // 35): warn when the plastic profile's deepest point is under three capillary lengths sqrt(gamma / (rho g)),
  // with gamma = 0.05 N/m assumed (water 0.072 N/m, from memory; sauces and creams lower).
  // Only the spreading layers (channel, plate) are thin enough for this; a squeeze disc and a slump are not checked.
  const double deepest = std::visit(
      overloaded{[&](const ChannelRig& c) { return std::sqrt(2.0 * tau * (c.reservoir_length + reading) / rho_g); },
                 [&](const PlateRig&) {
                   return std::sqrt(2.0 * tau * (setup.reading == Reading::Diameter ? reading / 2 : reading) / rho_g);
                 },
                 [](const SqueezeRig&) { return 0.0; }, [](const SlumpRig&) { return 0.0; }},
      setup.rig);
  const double capillary_length = std::sqrt(0.05 / rho_g);
  if (deepest > 0 && deepest < 3.0 * capillary_length)
    out.warnings.push_back(fmt::format(
        "the arrested layer is only {:.2g} mm deep at its deepest, under three capillary lengths ({:.2g} mm): "
        "surface tension, ignored here, shortens the spread, so this yield stress reads high",
        deepest * 1e3, 3.0 * capillary_length * 1e3));
  const double se = dlog_tau * out.sigma;
  ParameterEstimate estimate{.name = std::string(parameter_name(Parameter::YieldStress)),
                             .unit = std::string(parameter_info(Parameter::YieldStress).unit),
                             .value = tau,
                             .lower = tau * std::exp(-1.96 * se),
                             .upper = tau * std::exp(1.96 * se)};
  const std::optional<std::string> partial = partial_yield(setup, reading);
  if (partial) {
    estimate.value = estimate.lower;
    estimate.upper = std::numeric_limits<double>::infinity();
    estimate.upper_open = true;
    out.warnings.push_back(*partial);
  }
  out.parameters.push_back(estimate);
  out.names = {std::string(parameter_name(Parameter::YieldStress))};
  out.material.yield_stress = tau;
  out.correlation = Eigen::MatrixXd::Identity(1, 1);
  out.status = FitStatus::Converged;
  out.aicc = std::numeric_limits<double>::quiet_NaN();  // one reading, no curve: no AICc and no residual to report
  out.rmse = std::numeric_limits<double>::quiet_NaN();
  out.warnings.push_back(fmt::format("estimated from a single final reading by the plastic-limit relation: it assumes "
                                     "the sample had stopped{}; no viscosity or flow index can be estimated",
                                     partial ? "" : " and had yielded throughout"));
  return out;
}

}  // namespace spreadfit::fit
