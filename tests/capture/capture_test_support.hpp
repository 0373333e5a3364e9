// Truth curves for the capture tests, from the project's forward model (models/forward.hpp, verified against
// Huppert 1982 and the power-law similarity solutions in tests/models), sampled finely and interpolated.
#pragma once

#include <algorithm>
#include <functional>
#include <stdexcept>
#include <vector>

#include "models/forward.hpp"

namespace spreadfit::capture::test {

/// A reading [mm] against time since the release [s] from the forward model, tabulated every 5 ms to `end`
/// and interpolated linearly (the curve bends on a scale of 0.1 s and more, so the table adds < 0.01 mm).
class TruthCurve {
 public:
  TruthCurve(const TestSetup& setup, const Material& material, double end) {
    for (double t = 0; t <= end + 1e-9; t += 0.005) times_.push_back(t);
    // The curve only has to be a plausible front to render; its solver settings are pinned (40 cells, no
    // extrapolation: the defaults the videos were first rendered with) so a change of the forward defaults does not
    // move the rendered fronts by a fraction of a pixel under the capture requirements.
    ForwardOptions o;
    o.extrapolate = false;
    o.cells = 40;
    const ForwardResult r = predict_readings(setup, material, times_, o);
    if (!r.ok()) throw std::runtime_error("truth curve: " + r.message);
    for (double v : r.readings) values_.push_back(1000 * v);
  }
  double operator()(double t) const {
    if (t <= times_.front()) return values_.front();
    if (t >= times_.back()) return values_.back();
    const auto i = static_cast<std::size_t>(std::upper_bound(times_.begin(), times_.end(), t) - times_.begin());
    const double w = (t - times_[i - 1]) / (times_[i] - times_[i - 1]);
    return values_[i - 1] * (1 - w) + values_[i] * w;
  }
  std::function<double(double)> function() const {
    return [copy = *this](double t) { return copy(t); };
  }

 private:
  std::vector<double> times_, values_;
};

inline TestSetup plate_test_setup() {
  TestSetup s;
  s.rig = PlateRig{0.025, 6e-5};  // 25 mm ring, 60 mL: 31 mm deep at the release
  s.density = 1100;
  s.reading = Reading::Diameter;
  return s;
}

inline TestSetup channel_test_setup() {
  TestSetup s;
  s.rig = ChannelRig{0.05, 0.05, 1.0e-4, true};  // 50 mm wide, 50 mm reservoir, 100 mL
  s.density = 1100;
  s.reading = Reading::Front;
  return s;
}

}  // namespace spreadfit::capture::test
