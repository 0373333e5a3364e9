#include "models/rig.hpp"

#include <numbers>
#include <utility>

namespace spreadfit {

std::string_view rig_kind_name(const Rig& rig) {
  return std::visit(overloaded{[](const ChannelRig&) { return std::string_view("channel"); },
                               [](const PlateRig&) { return std::string_view("plate"); },
                               [](const SqueezeRig&) { return std::string_view("squeeze"); },
                               [](const SlumpRig&) { return std::string_view("slump"); }},
                    rig);
}

namespace {
// A default rig of the alternative at `index`.
template <std::size_t... I>
std::optional<Rig> rig_at(std::size_t index, std::index_sequence<I...>) {
  std::optional<Rig> out;
  ((index == I ? (out.emplace(std::in_place_index<I>), 0) : 0), ...);
  return out;
}

template <std::size_t... I>
std::array<std::string_view, sizeof...(I)> kind_names(std::index_sequence<I...>) {
  return {rig_kind_name(Rig(std::in_place_index<I>))...};
}
}  // namespace

const std::array<std::string_view, std::variant_size_v<Rig>>& rig_kind_names() {
  static const auto names = kind_names(std::make_index_sequence<std::variant_size_v<Rig>>{});
  return names;
}

std::optional<Rig> rig_of_kind(std::string_view kind) {
  for (std::size_t i = 0; i < rig_kind_names().size(); ++i)
    if (rig_kind_names()[i] == kind) return rig_at(i, std::make_index_sequence<std::variant_size_v<Rig>>{});
  return std::nullopt;
}

Reading default_reading(const Rig& rig) {
  return std::visit(overloaded{[](const ChannelRig&) { return Reading::Front; },
                               [](const PlateRig&) { return Reading::Radius; },
                               [](const SqueezeRig&) { return Reading::Gap; },
                               [](const SlumpRig&) { return Reading::Slump; }},
                    rig);
}

bool rig_accepts_reading(const Rig& rig, Reading r) {
  return std::visit(
      overloaded{[&](const ChannelRig&) { return r == Reading::Front; },
                 [&](const PlateRig&) { return r == Reading::Radius || r == Reading::Diameter; },
                 [&](const SqueezeRig&) { return r == Reading::Gap || r == Reading::Radius || r == Reading::Diameter; },
                 [&](const SlumpRig&) { return r == Reading::Slump; }},
      rig);
}

bool rig_is_timed(const Rig& rig) {
  return std::visit(overloaded{[](const ChannelRig&) { return true; }, [](const PlateRig&) { return true; },
                               [](const SqueezeRig&) { return true; }, [](const SlumpRig&) { return false; }},
                    rig);
}

std::optional<double> arrest_extent_exponent(const Rig& rig) {
  return std::visit(overloaded{[](const ChannelRig&) { return std::optional<double>(3.0); },
                               [](const PlateRig&) { return std::optional<double>(5.0); },
                               [](const SqueezeRig&) { return std::optional<double>(); },
                               [](const SlumpRig&) { return std::optional<double>(); }},
                    rig);
}

double fill_volume(const Rig& rig) {
  return std::visit(overloaded{[](const ChannelRig& c) { return c.volume; },
                               [](const PlateRig& p) { return p.volume; },
                               [](const SqueezeRig& s) { return s.volume; },
                               [](const SlumpRig& s) { return std::numbers::pi * s.radius * s.radius * s.height; }},
                    rig);
}

}  // namespace spreadfit
