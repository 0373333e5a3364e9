#include "src/qc/spec_translation.hpp"

#include <algorithm>
#include <boost/math/policies/error_handling.hpp>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>
#include <stdexcept>

#include "src/fit/parameter_names.hpp"
#include "src/parallel_for.hpp"

namespace spreadfit::qc {

namespace {

// The searched parameter at u in [0, 1] of its range; the ends exactly (not lo + (hi - lo) rounded).
double search_value(const SearchRange& search, double u) {
  if (u <= 0) return search.lo;
  if (u >= 1) return search.hi;
  return search.log_spaced ? search.lo * std::pow(search.hi / search.lo, u) : search.lo + u * (search.hi - search.lo);
}

// Where the reading is against the limits: -1 below, 0 within, +1 above.
int side(double r, double low, double high) { return r < low ? -1 : (r > high ? 1 : 0); }

struct Piece {
  double lo, hi;  // in the search coordinate u in [0, 1]
};

// A forward solve inside the scan failed: the scan of that combination stops and says so.
struct ForwardSolveFailed : std::runtime_error {
  ForwardSolveFailed() : std::runtime_error("the forward model failed") {}
};

// The in-limits set of one combination, as pieces of the search coordinate.
struct Scan {
  std::vector<Piece> pieces;
  int solves = 0;
  std::string failure;
};

Scan scan(const TestSetup& setup, double time, const Material& other, const SearchRange& search, double low,
          double high) {
  Scan out;
  const auto value_at = [&](double u) { return search_value(search, u); };
  const auto reading = [&](double u) {
    ++out.solves;
    const auto r = reading_at(setup, fit::with_parameter(other, search.parameter, value_at(u)), time);
    if (!r) throw ForwardSolveFailed();
    return *r;
  };
  try {
    const int n = search.samples;
    std::vector<double> u, r;
    for (int k = 0; k < n; ++k) {
      u.push_back(double(k) / (n - 1));
      r.push_back(reading(u.back()));
    }
    // start < 0: outside the limits; else where the current in-limits piece began.
    double start = side(r[0], low, high) == 0 ? 0.0 : -1.0;
    for (std::size_t k = 0; k + 1 < u.size(); ++k) {
      // Crossings of each limit inside [u_k, u_k+1] (one per limit at most at this sampling), in order along u.
      struct Crossing {
        double u;
        double level;
      };
      std::vector<Crossing> crossings;
      for (double level : {low, high}) {
        const double fa = r[k] - level, fb = r[k + 1] - level;
        if (fa == 0 || (fa < 0) == (fb < 0)) continue;
        std::uintmax_t iterations = 60;
        const auto root =
            boost::math::tools::toms748_solve([&](double x) { return reading(x) - level; }, u[k], u[k + 1], fa, fb,
                                              [](double a, double b) { return std::abs(b - a) < 1e-6; }, iterations);
        crossings.push_back({0.5 * (root.first + root.second), level});
      }
      std::sort(crossings.begin(), crossings.end(), [](const Crossing& a, const Crossing& b) { return a.u < b.u; });
      // Walk the interval: the state flips at every crossing; the sample at the end fixes the final state.
      int state = side(r[k], low, high);
      for (const Crossing& c : crossings) {
        const bool was_in = state == 0;
        if (c.level == low)
          state = state == -1 ? 0 : (state == 0 ? -1 : state);
        else
          state = state == 1 ? 0 : (state == 0 ? 1 : state);
        if (!was_in && state == 0) start = c.u;
        if (was_in && state != 0 && start >= 0) out.pieces.push_back({start, c.u}), start = -1;
      }
      const int end_state = side(r[k + 1], low, high);
      if (end_state == 0 && start < 0) start = u[k + 1];
      if (end_state != 0 && start >= 0) out.pieces.push_back({start, u[k + 1]}), start = -1;
    }
    if (start >= 0) out.pieces.push_back({start, 1.0});
  } catch (const ForwardSolveFailed& e) {
    out.failure = e.what();
  } catch (const boost::math::evaluation_error& e) {  // TOMS 748 found no root in a bracketing interval
    out.failure = e.what();
  }
  return out;
}

std::vector<Piece> intersect(const std::vector<Piece>& a, const std::vector<Piece>& b) {
  std::vector<Piece> out;
  for (const Piece& p : a)
    for (const Piece& q : b) {
      const double lo = std::max(p.lo, q.lo), hi = std::min(p.hi, q.hi);
      if (lo <= hi) out.push_back({lo, hi});
    }
  return out;
}

}  // namespace

std::optional<double> reading_at(const TestSetup& setup, const Material& material, double time) {
  try {
    validate(material);
    const ForwardResult r = predict_readings(setup, material, {time});
    if (!r.ok() || r.readings.empty() || !std::isfinite(r.readings.front())) return std::nullopt;
    return r.readings.front();
  } catch (const std::invalid_argument&) {
    return std::nullopt;
  }
}

std::vector<std::optional<double>> readings_at(const TestSetup& setup, const std::vector<Material>& materials,
                                               double time) {
  std::vector<std::optional<double>> readings(materials.size());
  parallel_for(materials.size(), [&](std::size_t i) { readings[i] = reading_at(setup, materials[i], time); });
  return readings;
}

ReadingRange reading_range(const TestSetup& setup, const std::vector<Material>& materials, double time) {
  ReadingRange out;
  const std::vector<std::optional<double>> readings = readings_at(setup, materials, time);
  out.solves = int(materials.size());
  out.low = INFINITY;
  out.high = -INFINITY;
  for (const auto& r : readings) {
    if (!r) {
      out.failure = "the forward model failed inside the ranges";
      return out;
    }
    out.low = std::min(out.low, *r);
    out.high = std::max(out.high, *r);
    out.readings.push_back(*r);
  }
  return out;
}

ParameterLimits solve_parameter_limits(const TestSetup& setup, double time, const std::vector<Material>& others,
                                       const SearchRange& search, double reading_low, double reading_high) {
  if (others.empty()) throw std::invalid_argument("solve_parameter_limits: no combination of the other parameters");
  if (!(search.lo < search.hi) || (search.log_spaced && !(search.lo > 0)) || search.samples < 3)
    throw std::invalid_argument(
        "solve_parameter_limits: search range must have lo < hi (lo > 0 when log-spaced) "
        "and at least 3 samples");
  if (!(reading_low <= reading_high) || !std::isfinite(reading_low) || !std::isfinite(reading_high))
    throw std::invalid_argument("solve_parameter_limits: reading limits must be finite with low <= high");
  std::vector<Scan> scans(others.size());
  parallel_for(others.size(),
               [&](std::size_t i) { scans[i] = scan(setup, time, others[i], search, reading_low, reading_high); });
  ParameterLimits out;
  for (const Scan& s : scans) {
    out.solves += s.solves;
    if (!s.failure.empty() && out.failure.empty()) out.failure = s.failure;
  }
  if (!out.ok()) return out;
  const auto value_at = [&](double u) { return search_value(search, u); };
  double union_lo = INFINITY, union_hi = -INFINITY;
  std::vector<Piece> common = {{0.0, 1.0}};
  for (const Scan& s : scans) {
    if (s.pieces.size() > 1) out.single_interval = false;
    for (const Piece& p : s.pieces) union_lo = std::min(union_lo, p.lo), union_hi = std::max(union_hi, p.hi);
    common = intersect(common, s.pieces);
  }
  if (union_lo <= union_hi) {
    out.possible = Interval{value_at(union_lo), value_at(union_hi)};
    out.possible_at_low_edge = union_lo == 0.0;
    out.possible_at_high_edge = union_hi == 1.0;
  }
  if (!common.empty()) {
    out.assured_single_interval = common.size() == 1;
    double lo = INFINITY, hi = -INFINITY;
    for (const Piece& p : common) lo = std::min(lo, p.lo), hi = std::max(hi, p.hi);
    out.assured = Interval{value_at(lo), value_at(hi)};
  }
  return out;
}

}  // namespace spreadfit::qc
