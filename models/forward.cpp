#include "models/forward.hpp"

#include <cmath>
#include <numbers>
#include <stdexcept>
#include <string>

#include "models/slump.hpp"
#include "models/squeeze_flow.hpp"
#include "models/low_order.hpp"
#include "models/thin_film.hpp"
#include <limits>

namespace spreadfit {

namespace {

using std::numbers::pi;

void require_positive(double v, const char* field) {
  if (!(v > 0) || !std::isfinite(v)) throw std::invalid_argument(std::string(field) + " must be a finite value > 0");
}

SpreadingOptions spreading_options(const ForwardOptions& o) {
  SpreadingOptions s;
  s.cells = o.cells;
  s.extrapolate = o.extrapolate;
  s.rel_tol = o.rel_tol;
  s.max_steps = o.max_steps;
  s.jacobian_reuse = o.jacobian_reuse;
  s.stepper = o.stepper;
  s.rates = o.rates;
  return s;
}

void copy_solution(const SpreadingSolution& s, double offset, double scale, ForwardResult& out) {
  out.steps = s.steps;
  if (!s.ok()) {
    out.status = s.status;
    out.message = s.message;
    return;
  }
  out.readings.reserve(s.fronts.size());
  for (double x : s.fronts) out.readings.push_back(scale * (x - offset));
  for (double v : s.rates) out.rates.push_back(scale * v);
}

ForwardResult channel(const ChannelRig& rig, const TestSetup& setup, const Material& m,
                      const std::vector<double>& times, const ForwardOptions& o) {
  require_positive(rig.width, "rig.width");
  require_positive(rig.reservoir_length, "rig.reservoir_length");
  require_positive(rig.volume, "rig.volume");
  SpreadingProblem p;
  p.geometry = Geometry::Planar;
  p.initial_extent = rig.reservoir_length;
  p.initial_height = rig.volume / (rig.width * rig.reservoir_length);
  p.rho_g = setup.density * setup.gravity;
  p.material = m;
  p.channel_width = rig.side_wall_drag ? rig.width : 0.0;
  ForwardResult out;
  copy_solution(solve_spreading(p, times, spreading_options(o)), rig.reservoir_length, 1.0, out);
  if (!rig.side_wall_drag && p.initial_height > 0.1 * rig.width)
    out.notes.push_back("side-wall drag is off although the initial depth is " +
                        std::to_string(p.initial_height / rig.width).substr(0, 4) +
                        "x the channel width: the planar model overestimates the flow while the layer is deep");
  return out;
}

ForwardResult plate(const PlateRig& rig, const TestSetup& setup, const Material& m, const std::vector<double>& times,
                    const ForwardOptions& o) {
  require_positive(rig.ring_radius, "rig.ring_radius");
  require_positive(rig.volume, "rig.volume");
  SpreadingProblem p;
  p.geometry = Geometry::Axisymmetric;
  p.initial_extent = rig.ring_radius;
  p.initial_height = rig.volume / (pi * rig.ring_radius * rig.ring_radius);
  p.rho_g = setup.density * setup.gravity;
  p.material = m;
  ForwardResult out;
  copy_solution(solve_spreading(p, times, spreading_options(o)), 0.0, setup.reading == Reading::Diameter ? 2.0 : 1.0,
                out);
  return out;
}

ForwardResult squeeze(const SqueezeRig& rig, const TestSetup& setup, const Material& m,
                      const std::vector<double>& times, const ForwardOptions& o) {
  SqueezeOptions so;
  so.max_steps = o.max_steps;
  const SqueezeSolution s = solve_squeeze(rig, m, times, so);
  ForwardResult out;
  out.steps = s.steps;
  if (!s.ok()) {
    out.status = s.status;
    out.message = s.message;
    return out;
  }
  for (std::size_t i = 0; i < s.gaps.size(); ++i) {
    const double h = s.gaps[i];
    const double radius = std::sqrt(rig.volume / (pi * h));
    // The gap closes at the squeeze rate; the disc's radius sqrt(V / (pi h)) grows at -(radius / 2h) dh/dt. At
    // t = 0 the load is applied: the rate there is the one it starts at.
    const double gap_rate = o.rates ? -squeeze_rate(rig, m, h) : 0.0;
    switch (setup.reading) {
      case Reading::Gap:
        out.readings.push_back(h);
        if (o.rates) out.rates.push_back(gap_rate);
        break;
      case Reading::Radius:
        out.readings.push_back(radius);
        if (o.rates) out.rates.push_back(-radius / (2 * h) * gap_rate);
        break;
      default:
        out.readings.push_back(2.0 * radius);
        if (o.rates) out.rates.push_back(-radius / h * gap_rate);
        break;
    }
  }
  return out;
}

ForwardResult slump(const SlumpRig& rig, const TestSetup& setup, const Material& m, const std::vector<double>& times,
                    const ForwardOptions& o) {
  const SlumpPrediction s = predict_slump(rig, m, setup.density, setup.gravity);
  ForwardResult out;
  out.readings.assign(times.size(), s.slump);
  if (o.rates) out.rates.assign(times.size(), 0.0);
  out.notes = s.warnings;
  out.notes.insert(out.notes.begin(), std::string("slump model regime: ") + std::string(slump_regime_name(s.regime)) +
                                          " (static final slump, the same at every time)");
  return out;
}

}  // namespace

double reading_derivative_log_consistency(double time, double rate, double flow_index) {
  return -time / flow_index * rate;
}

std::string_view reading_name(Reading reading) {
  switch (reading) {
    case Reading::Front: return "front";
    case Reading::Radius: return "radius";
    case Reading::Diameter: return "diameter";
    case Reading::Gap: return "gap";
    case Reading::Slump: return "slump";
  }
  return "unknown";
}

ForwardResult predict_readings(const TestSetup& setup, const Material& m, const std::vector<double>& times,
                               const ForwardOptions& options) {
  validate(m);
  require_positive(setup.density, "sample.density");
  require_positive(setup.gravity, "gravity");
  if (!rig_accepts_reading(setup.rig, setup.reading))
    throw std::invalid_argument("the rig does not read '" + std::string(reading_name(setup.reading)) + "'");
  return std::visit(overloaded{[&](const ChannelRig& rig) { return channel(rig, setup, m, times, options); },
                               [&](const PlateRig& rig) { return plate(rig, setup, m, times, options); },
                               [&](const SqueezeRig& rig) { return squeeze(rig, setup, m, times, options); },
                               [&](const SlumpRig& rig) { return slump(rig, setup, m, times, options); }},
                    setup.rig);
}

}  // namespace spreadfit

namespace spreadfit {

std::vector<double> predict_readings_low_order(const TestSetup& setup, const Material& m,
                                               const std::vector<double>& times) {
  const Rig& rig = setup.rig;
  // Squeeze and slump rigs have no low-order model: the full one is already cheap.
  auto full_model = [&] {
    const ForwardResult r = predict_readings(setup, m, times);
    return r.ok() ? r.readings : std::vector<double>(times.size(), std::numeric_limits<double>::quiet_NaN());
  };
  SpreadingProblem p;
  p.rho_g = setup.density * setup.gravity;
  p.material = m;
  double offset = 0.0, scale = 1.0;
  const bool low_order = std::visit(overloaded{[&](const ChannelRig& c) {
                                                 p.geometry = Geometry::Planar;
                                                 p.initial_extent = c.reservoir_length;
                                                 p.initial_height = c.volume / (c.width * c.reservoir_length);
                                                 offset = c.reservoir_length;
                                                 p.channel_width = c.side_wall_drag ? c.width : 0.0;
                                                 return true;
                                               },
                                               [&](const PlateRig& pl) {
                                                 p.geometry = Geometry::Axisymmetric;
                                                 p.initial_extent = pl.ring_radius;
                                                 p.initial_height = pl.volume / (std::numbers::pi * pl.ring_radius *
                                                                                 pl.ring_radius);
                                                 if (setup.reading == Reading::Diameter) scale = 2.0;
                                                 return true;
                                               },
                                               [](const SqueezeRig&) { return false; },
                                               [](const SlumpRig&) { return false; }},
                                    rig);
  if (!low_order) return full_model();
  std::vector<double> out = solve_low_order(p, times).fronts;
  for (double& x : out) x = scale * (x - offset);
  return out;
}

}  // namespace spreadfit
