#include "src/io/description_file.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <cstdio>
#include <cmath>
#include <cstdlib>
#include <limits>
#include <numbers>
#include <set>
#include <string_view>
#include <system_error>
#include <toml++/toml.h>

#include "models/forward.hpp"
#include "models/squeeze_flow.hpp"
#include "src/io/input_error.hpp"
#include "src/io/parameter_table.hpp"
#include "src/io/test_time.hpp"
#include "src/io/plausible_ranges.hpp"
#include "src/io/units.hpp"

namespace spreadfit::io {

namespace {

// Plausibility limits, see description_file.hpp.
constexpr double kDensityMin = 100.0;    // kg/m^3
constexpr double kDensityMax = 3000.0;   // kg/m^3
constexpr double kCelsiusZero = 273.15;  // K (SI Brochure 9th ed., Table 4)
constexpr double kTemperatureMin = kCelsiusZero - 50.0;
constexpr double kTemperatureMax = kCelsiusZero + 150.0;
// Longest sample id or product code: ids go into file names, tables and the history (common practice, no source).
constexpr std::size_t kMaxIdLength = 64;
// Largest test description read: a full one is under 2 kB.
constexpr std::uintmax_t kMaxTomlBytes = 1u << 20;

using Names = std::vector<std::string_view>;

const Names kTables{"sample", "rig", "readings", "fit", "spec", "capture"};
const Names kSampleKeys{"id", "product", "density", "temperature", "site", "tested"};
const Names kRigKinds(rig_kind_names().begin(), rig_kind_names().end());
const Names kChannelKeys{"kind", "width", "reservoir_length", "volume", "fill_height", "side_wall_drag"};
const Names kPlateKeys{"kind", "ring_radius", "volume", "fill_height"};
const Names kSqueezeKeys{"kind", "volume", "load", "force", "initial_gap"};
const Names kSlumpKeys{"kind", "radius", "height"};
/// The [rig] keys of each rig kind.
const Names& rig_keys(const Rig& rig) {
  return std::visit(overloaded{[](const ChannelRig&) -> const Names& { return kChannelKeys; },
                               [](const PlateRig&) -> const Names& { return kPlateKeys; },
                               [](const SqueezeRig&) -> const Names& { return kSqueezeKeys; },
                               [](const SlumpRig&) -> const Names& { return kSlumpKeys; }},
                    rig);
}
const Names kReadingsKeys{"file", "files", "final", "reading", "resolution"};
const Names kFitKeys{"model", "time_origin", "ignore_before"};
const Names kModelNames{"newtonian", "power-law", "bingham", "herschel-bulkley", "auto"};
const Names kTimeOrigins{"fit", "zero"};
/// The parameters a spec limits: the parameter table's rows marked spec_key, by its names, in the order messages
/// list them.
const Names kSpecKeys = [] {
  Names keys;
  for (const Parameter id : {Parameter::Viscosity, Parameter::YieldStress, Parameter::Consistency, Parameter::FlowIndex})
    if (parameter_info(id).spec_key) keys.push_back(parameter_name(id));
  return keys;
}();
const Names kCaptureKeys{"video", "scale", "board", "square", "release", "every", "times"};
const Names kScaleNames{"board", "ring", "channel"};
const Names kCatalogueKeys = [] {
  Names keys = kSpecKeys;
  for (const std::string_view key :
       {"reference_temperature", "activation_energy", "yield_stress_activation_energy", "flow_index_prior"})
    keys.push_back(key);
  return keys;
}();

std::string_view type_name(const toml::node& node) {
  switch (node.type()) {
    case toml::node_type::table: return "a table";
    case toml::node_type::array: return "an array";
    case toml::node_type::string: return "a string";
    case toml::node_type::integer: return "an integer";
    case toml::node_type::floating_point: return "a float";
    case toml::node_type::boolean: return "a boolean";
    case toml::node_type::date: return "a date";
    case toml::node_type::time: return "a time of day";
    case toml::node_type::date_time: return "a date-time";
    case toml::node_type::none: break;
  }
  return "nothing";
}

int line_of(const toml::node& node) { return static_cast<int>(node.source().begin.line); }
int line_of(const toml::key& key) { return static_cast<int>(key.source().begin.line); }

std::string example_of(Dimension d) {
  switch (d) {
    case Dimension::Length: return "\"2.9 cm\"";
    case Dimension::Volume: return "\"100 mL\"";
    case Dimension::Mass: return "\"250 g\"";
    case Dimension::Density: return "\"1.10 g/mL\"";
    case Dimension::Time: return "\"2 s\"";
    case Dimension::Stress: return "\"25 Pa\"";
    case Dimension::Viscosity: return "\"1.2 Pa.s\"";
    case Dimension::Consistency: return "\"8 Pa.s^n\"";
    case Dimension::Force: return "\"2.5 N\"";
    case Dimension::Temperature: return "\"21.5 degC\"";
    case Dimension::MolarEnergy: return "\"45 kJ/mol\"";
    case Dimension::Dimensionless: return "0.5";
  }
  return "";
}

/// "a length, such as "2.9 cm" or a number in m"
std::string expected_quantity(Dimension d) {
  if (d == Dimension::Dimensionless) return "a number, such as 0.5";
  return "a " + std::string(dimension_name(d)) + ", such as " + example_of(d) + " or a number in " +
         std::string(si_unit_symbol(d));
}

/// The reader of one test description: the file name and the error helpers in one place.
class DescriptionReader {
 public:
  explicit DescriptionReader(std::filesystem::path file, LoadOptions options = {})
      : file_(std::move(file)), name_(file_.string()), options_(options) {}

  TestDescription read();

 private:
  [[noreturn]] void fail(int line, const std::string& field, const std::string& message) const {
    throw InputError(name_, line, field, message);
  }

  const toml::table* table(const toml::table& root, std::string_view name) const;
  void check_keys(const toml::table& table, std::string_view section, const Names& allowed,
                  const Names& other_kinds = {}, std::string_view kind = {}) const;
  const toml::node& required(const toml::table& table, std::string_view section, std::string_view key,
                             const std::string& expected) const;
  std::string text(const toml::node& node, const std::string& field) const;
  std::string name_in(const toml::node& node, const std::string& field, const Names& allowed,
                      std::string_view what) const;
  bool boolean(const toml::node& node, const std::string& field) const;
  /// An id or code: text of at most kMaxIdLength characters, none of them a control character.
  std::string identifier(const toml::node& node, const std::string& field) const;
  /// Refuses `value` outside the possible range (exit 2), records a warning outside the usual one.
  void plausible(double value, const toml::node& node, const std::string& field, const PlausibleRange& range) const;
  double quantity(const toml::node& node, const std::string& field, Dimension d, Range range) const;
  /// How a quantity node was written, for messages.
  std::string as_written(const toml::node& node) const;

  void read_sample(const toml::table& root, TestDescription& out) const;
  /// [sample] tested in canonical form (test_time.hpp), from a string or a TOML date / date-time.
  std::string tested_time(const toml::node& node) const;
  Rig read_rig(const toml::table& root) const;
  void read_readings(const toml::table& root, TestDescription& out) const;
  void read_fit(const toml::table& root, TestDescription& out) const;
  void read_capture(const toml::table& root, TestDescription& out) const;
  void check_possible(const TestDescription& out) const;
  void check_direction(const TestDescription& out) const;
  void check_final_reading(double value, const toml::node& node, const Rig& rig, Reading reading) const;
  void read_spec(const toml::table& root, TestDescription& out) const;
  void read_spec_table(const toml::table& spec, const std::string& section, std::vector<SpecLimit>& limits,
                       const Names& allowed = kSpecKeys) const;

 public:
  std::map<std::string, ProductSpec> read_catalogue() const;

 private:
  toml::table parse() const {
    std::error_code ec;
    const std::uintmax_t size = std::filesystem::file_size(file_, ec);
    if (!ec && size > kMaxTomlBytes)
      throw InputError(name_, 0, "", fmt::format("file is {} kB (expected a TOML file of at most {} kB)", size >> 10,
                                                 kMaxTomlBytes >> 10));
    try {
      return toml::parse_file(name_);
    } catch (const toml::parse_error& e) {
      throw InputError(name_, static_cast<int>(e.source().begin.line), "",
                       "TOML syntax: " + std::string(e.description()), static_cast<int>(e.source().begin.column));
    }
  }

  std::filesystem::path file_;
  std::string name_;
  LoadOptions options_;

 public:
  /// Warnings about implausible values, "FILE:LINE: FIELD: message" each, in the order found.
  mutable std::vector<std::string> warnings_;
};

std::string DescriptionReader::identifier(const toml::node& node, const std::string& field) const {
  const std::string value = text(node, field);
  if (value.size() > kMaxIdLength)
    fail(line_of(node), field,
         fmt::format("'{}' is {} characters long (expected at most {})", shorten_for_message(value, 24), value.size(),
                     kMaxIdLength));
  for (char c : value)
    if (static_cast<unsigned char>(c) < 0x20 || c == 0x7F)
      fail(line_of(node), field,
           quote_for_message(value) + " holds a control character (expected printable text)");
  return value;
}

void DescriptionReader::plausible(double value, const toml::node& node, const std::string& field,
                                  const PlausibleRange& range) const {
  try {
    if (auto warning = check_plausible(value, range, as_written(node)))
      warnings_.push_back(InputError(name_, line_of(node), field, *warning).what());
  } catch (const UnitError& e) {
    fail(line_of(node), field, e.what());
  }
}

const toml::table* DescriptionReader::table(const toml::table& root, std::string_view name) const {
  const toml::node* node = root.get(name);
  if (!node) return nullptr;
  if (!node->is_table())
    fail(line_of(*node), std::string(name),
         "expected a table [" + std::string(name) + "], got " + std::string(type_name(*node)));
  return node->as_table();
}

/// A table's keys in file order (toml++ iterates them sorted by name), so errors cite the first one written.
std::vector<const toml::key*> keys_in_file_order(const toml::table& table) {
  std::vector<const toml::key*> keys;
  for (auto&& [key, node] : table) keys.push_back(&key);
  std::stable_sort(keys.begin(), keys.end(), [](const toml::key* a, const toml::key* b) {
    const auto& pa = a->source().begin;
    const auto& pb = b->source().begin;
    return pa.line != pb.line ? pa.line < pb.line : pa.column < pb.column;
  });
  return keys;
}

void DescriptionReader::check_keys(const toml::table& table, std::string_view section, const Names& allowed,
                                   const Names& other_kinds, std::string_view kind) const {
  for (const toml::key* key_ptr : keys_in_file_order(table)) {
    const toml::key& key = *key_ptr;
    const std::string_view k = key.str();
    if (std::find(allowed.begin(), allowed.end(), k) != allowed.end()) continue;
    const std::string field = std::string(section) + "." + std::string(k);
    if (std::find(other_kinds.begin(), other_kinds.end(), k) != other_kinds.end())
      fail(line_of(key), field,
           "key '" + std::string(k) + "' does not apply to a " + std::string(kind) + " rig (expected: " +
               join_names(allowed) + ")");
    fail(line_of(key), field,
         "unknown key '" + std::string(k) + "' in [" + std::string(section) + "]" + did_you_mean(k, allowed));
  }
}

const toml::node& DescriptionReader::required(const toml::table& table, std::string_view section,
                                              std::string_view key, const std::string& expected) const {
  const toml::node* node = table.get(key);
  if (!node)
    fail(line_of(table), std::string(section) + "." + std::string(key),
         "missing required key in [" + std::string(section) + "] (expected " + expected + ")");
  return *node;
}

std::string DescriptionReader::text(const toml::node& node, const std::string& field) const {
  const auto* s = node.as_string();
  if (!s) fail(line_of(node), field, "expected a string, got " + std::string(type_name(node)));
  const std::string value = s->get();
  if (value.find_first_not_of(" \t") == std::string::npos) fail(line_of(node), field, "empty string (expected text)");
  return value;
}

std::string DescriptionReader::name_in(const toml::node& node, const std::string& field, const Names& allowed,
                                       std::string_view what) const {
  const auto* s = node.as_string();
  if (!s)
    fail(line_of(node), field,
         "expected a string, one of " + join_names(allowed) + ", got " + std::string(type_name(node)));
  const std::string value = s->get();
  if (std::find(allowed.begin(), allowed.end(), value) == allowed.end())
    fail(line_of(node), field, "unknown " + std::string(what) + " '" + value + "'" + did_you_mean(value, allowed));
  return value;
}

bool DescriptionReader::boolean(const toml::node& node, const std::string& field) const {
  const auto* b = node.as_boolean();
  if (!b) fail(line_of(node), field, "expected true or false, got " + std::string(type_name(node)));
  return b->get();
}

std::string DescriptionReader::as_written(const toml::node& node) const {
  if (const auto* s = node.as_string()) return s->get();
  if (const auto* i = node.as_integer()) return fmt::format("{}", i->get());
  if (const auto* f = node.as_floating_point()) return fmt::format("{}", f->get());
  return std::string(type_name(node));
}

double DescriptionReader::quantity(const toml::node& node, const std::string& field, Dimension d,
                                   Range range) const {
  try {
    if (const auto* s = node.as_string()) return parse_quantity(s->get(), d, range);
    double value = 0;
    if (const auto* i = node.as_integer())
      value = static_cast<double>(i->get());
    else if (const auto* f = node.as_floating_point())
      value = f->get();
    else
      fail(line_of(node), field, "expected " + expected_quantity(d) + ", got " + std::string(type_name(node)));
    check_range(value, d, range, as_written(node));
    return value;
  } catch (const UnitError& e) {
    fail(line_of(node), field, e.what());
  }
}

std::string DescriptionReader::tested_time(const toml::node& node) const {
  std::string written;
  if (const auto* s = node.as_string()) {
    written = s->get();
  } else if (const auto* d = node.as_date()) {  // a TOML date, tested = 2026-04-12
    written = fmt::format("{:04}-{:02}-{:02}", d->get().year, d->get().month, d->get().day);
  } else if (const auto* dt = node.as_date_time()) {  // a TOML date-time, tested = 2026-04-12T10:30:00
    const toml::date_time& v = dt->get();
    written = fmt::format("{:04}-{:02}-{:02}T{:02}:{:02}:{:02}", v.date.year, v.date.month, v.date.day, v.time.hour,
                          v.time.minute, v.time.second);
    if (v.offset) {
      const int m = v.offset->minutes;
      written += m == 0 ? std::string("Z") : fmt::format("{}{:02}:{:02}", m < 0 ? '-' : '+', std::abs(m) / 60, std::abs(m) % 60);
    }
  } else {
    fail(line_of(node), "sample.tested",
         "expected a date or date-time such as \"2026-04-12T10:30\", got " + std::string(type_name(node)));
  }
  std::string why;
  const std::optional<std::string> canonical = canonical_test_time(written, why);
  if (!canonical) fail(line_of(node), "sample.tested", fmt::format("'{}': {}", written, why));
  return *canonical;
}

void DescriptionReader::read_sample(const toml::table& root, TestDescription& out) const {
  const toml::table* sample = table(root, "sample");
  if (!sample) fail(0, "sample", "missing table [sample] (expected at least id and density)");
  check_keys(*sample, "sample", kSampleKeys);

  out.sample_id =
      identifier(required(*sample, "sample", "id", "the sample's id, such as \"TS12-0412\""), "sample.id");
  if (const toml::node* p = sample->get("product")) out.product = identifier(*p, "sample.product");
  if (const toml::node* p = sample->get("site")) {
    out.site = text(*p, "sample.site");
    if (out.site.find_first_of("\r\n\t") != std::string::npos)
      fail(line_of(*p), "sample.site", "the site code holds a line break or tab (expected a short code such as \"RH\")");
  }
  if (const toml::node* p = sample->get("tested")) out.tested = tested_time(*p);

  const toml::node& density = required(*sample, "sample", "density", expected_quantity(Dimension::Density));
  out.density = quantity(density, "sample.density", Dimension::Density, Range::Positive);
  if (out.density < kDensityMin || out.density > kDensityMax)
    fail(line_of(density), "sample.density",
         fmt::format("'{}' is {} kg/m3, outside any sauce or cream (expected {} to {} kg/m3; write a unit, "
                     "such as \"1.10 g/mL\")",
                     as_written(density), out.density, kDensityMin, kDensityMax));

  if (const toml::node* t = sample->get("temperature")) {
    const double kelvin = quantity(*t, "sample.temperature", Dimension::Temperature, Range::Positive);
    if (kelvin < kTemperatureMin || kelvin > kTemperatureMax)
      fail(line_of(*t), "sample.temperature",
           fmt::format("'{}' is {} K, outside -50 to 150 degC (a bare number is in K; write a unit, such as "
                       "\"21.5 degC\")",
                       as_written(*t), kelvin));
    out.temperature = kelvin;
  }
}

Rig DescriptionReader::read_rig(const toml::table& root) const {
  const toml::table* rig = table(root, "rig");
  if (!rig) fail(0, "rig", "missing table [rig] (expected kind = channel | plate | squeeze | slump and its sizes)");
  const std::string kind =
      name_in(required(*rig, "rig", "kind", "channel, plate, squeeze or slump"), "rig.kind", kRigKinds, "rig kind");

  Rig out = *rig_of_kind(kind);
  const Names* own = &rig_keys(out);
  Names others;
  for (std::string_view other_kind : rig_kind_names())
    for (std::string_view k : rig_keys(*rig_of_kind(other_kind)))
      if (std::find(own->begin(), own->end(), k) == own->end()) others.push_back(k);
  check_keys(*rig, "rig", *own, others, kind);

  auto length = [&](std::string_view key, const char* what, const PlausibleRange& range) {
    const toml::node& node = required(*rig, "rig", key, expected_quantity(Dimension::Length) + ": " + what);
    const std::string field = "rig." + std::string(key);
    const double value = quantity(node, field, Dimension::Length, Range::Positive);
    plausible(value, node, field, range);
    return value;
  };
  // volume, or fill_height times the footprint
  auto volume_or_fill = [&](double footprint, const char* fill_meaning) {
    const toml::node* volume = rig->get("volume");
    const toml::node* fill = rig->get("fill_height");
    if (volume && fill)
      fail(line_of(*fill), "rig.fill_height", "give volume or fill_height, not both");
    if (volume) {
      const double v = quantity(*volume, "rig.volume", Dimension::Volume, Range::Positive);
      plausible(v, *volume, "rig.volume", plausible::sample_volume);
      return v;
    }
    if (fill) {
      const double h = quantity(*fill, "rig.fill_height", Dimension::Length, Range::Positive);
      plausible(h, *fill, "rig.fill_height", plausible::fill_height);
      return footprint * h;
    }
    fail(line_of(*rig), "rig.volume",
         std::string("missing required key in [rig] (expected volume, such as \"100 mL\", or fill_height: ") +
             fill_meaning + ")");
  };

  std::visit(overloaded{[&](ChannelRig& c) {
                          c.width = length("width", "the channel's width", plausible::channel_width);
                          c.reservoir_length = length("reservoir_length", "the sample block's length behind the gate",
                                                      plausible::reservoir_length);
                          c.volume = volume_or_fill(c.width * c.reservoir_length, "the sample's depth behind the gate");
                          if (const toml::node* drag = rig->get("side_wall_drag"))
                            c.side_wall_drag = boolean(*drag, "rig.side_wall_drag");
                        },
                        [&](PlateRig& p) {
                          p.ring_radius = length("ring_radius", "the ring's inner radius", plausible::ring_radius);
                          p.volume = volume_or_fill(std::numbers::pi * p.ring_radius * p.ring_radius,
                                                    "the sample's depth in the ring");
                        },
                        [&](SqueezeRig& s) {
                          const toml::node& volume =
                              required(*rig, "rig", "volume", expected_quantity(Dimension::Volume));
                          s.volume = quantity(volume, "rig.volume", Dimension::Volume, Range::Positive);
                          plausible(s.volume, volume, "rig.volume", plausible::sample_volume);
                          const toml::node* load = rig->get("load");
                          const toml::node* force = rig->get("force");
                          if (load && force) fail(line_of(*force), "rig.force", "give load (a mass) or force, not both");
                          if (load) {
                            s.force = standard_gravity * quantity(*load, "rig.load", Dimension::Mass, Range::Positive);
                            plausible(s.force, *load, "rig.load", plausible::squeeze_force);
                          } else if (force) {
                            s.force = quantity(*force, "rig.force", Dimension::Force, Range::Positive);
                            plausible(s.force, *force, "rig.force", plausible::squeeze_force);
                          } else
                            fail(line_of(*rig), "rig.load",
                                 "missing required key in [rig] (expected load, the mass on the sample including the "
                                 "top plate, such as \"250 g\", or force, such as \"2.5 N\")");
                          if (const toml::node* gap = rig->get("initial_gap")) {
                            s.initial_gap = quantity(*gap, "rig.initial_gap", Dimension::Length, Range::Positive);
                            plausible(s.initial_gap, *gap, "rig.initial_gap", plausible::initial_gap);
                          }
                        },
                        [&](SlumpRig& s) {
                          s.radius = length("radius", "the cylinder's radius", plausible::cylinder_radius);
                          s.height = length("height", "the cylinder's height", plausible::cylinder_height);
                        }},
             out);
  return out;
}

void DescriptionReader::read_readings(const toml::table& root, TestDescription& out) const {
  const Rig& rig = out.setup.rig;
  const std::string rig_kind(rig_kind_name(rig));
  auto expected_readings = [&] {
    Names names;
    for (std::string_view n : reading_names())
      if (rig_accepts_reading(rig, *reading_from_name(n))) names.push_back(n);
    return join_names(names);
  };

  out.setup.reading = default_reading(rig);
  const toml::table* readings = table(root, "readings");
  if (!readings) return;
  check_keys(*readings, "readings", kReadingsKeys);

  const toml::node* file = readings->get("file");
  const toml::node* files = readings->get("files");
  const toml::node* final = readings->get("final");
  const int sources = (file ? 1 : 0) + (files ? 1 : 0) + (final ? 1 : 0);
  if (sources > 1) {
    const toml::node* second = final ? final : files;
    fail(line_of(*second), final ? "readings.final" : "readings.files",
         "give one of file, files and final, not several");
  }

  std::optional<Reading> named;
  const toml::node* reading_node = readings->get("reading");
  if (reading_node) {
    named = reading_from_name(name_in(*reading_node, "readings.reading", reading_names(), "reading"));
    if (!rig_accepts_reading(rig, *named))
      fail(line_of(*reading_node), "readings.reading",
           "a " + rig_kind + " rig has no " + std::string(reading_names()[static_cast<std::size_t>(*named)]) +
               " reading (expected " + expected_readings() + ")");
    out.setup.reading = *named;
  }

  if (const toml::node* r = readings->get("resolution")) {
    out.resolution = quantity(*r, "readings.resolution", Dimension::Length, Range::Positive);
    plausible(*out.resolution, *r, "readings.resolution", plausible::resolution);
  }

  if (final) {
    out.final_reading = quantity(*final, "readings.final", Dimension::Length, Range::NonNegative);
    plausible(*out.final_reading, *final, "readings.final", plausible::spread_reading);
    check_final_reading(*out.final_reading, *final, rig, out.setup.reading);
    if (const auto* slump = std::get_if<SlumpRig>(&rig); slump && *out.final_reading > slump->height)
      fail(line_of(*final), "readings.final",
           fmt::format("slump '{}' is more than the cylinder's height {} m (expected 0 to the height)",
                       as_written(*final), slump->height));
    if (const auto* squeeze = std::get_if<SqueezeRig>(&rig);
        squeeze && out.setup.reading == Reading::Gap && squeeze->initial_gap > 0 &&
        *out.final_reading > squeeze->initial_gap)
      fail(line_of(*final), "readings.final",
           fmt::format("final gap '{}' is more than initial_gap {} m (expected the gap to close under the load)",
                       as_written(*final), squeeze->initial_gap));
    return;
  }

  // file or files: collect (path as written, node) pairs
  std::vector<std::pair<std::string, const toml::node*>> listed;
  std::string field;
  if (file) {
    field = "readings.file";
    listed.emplace_back(text(*file, field), file);
  } else if (files) {
    field = "readings.files";
    const toml::array* array = files->as_array();
    if (!array)
      fail(line_of(*files), field, "expected an array of file names, such as [\"a.csv\", \"b.csv\"], got " +
                                       std::string(type_name(*files)));
    if (array->empty()) fail(line_of(*files), field, "empty array (expected at least one readings file)");
    for (const toml::node& element : *array) listed.emplace_back(text(element, field), &element);
  } else {
    return;  // no readings: enough to simulate
  }
  if (!rig_is_timed(rig))
    fail(line_of(*listed.front().second), field,
         "a slump rig has only a final reading (expected final = \"...\" instead of a readings file)");

  const std::filesystem::path folder = file_.parent_path();
  std::set<std::filesystem::path> seen;
  for (const auto& [written, node] : listed) {
    const std::filesystem::path resolved = (folder / written).lexically_normal();
    if (!seen.insert(resolved).second)
      fail(line_of(*node), field, "'" + written + "' is listed twice (expected each replicate once)");
    out.readings_files.push_back(resolved);
    if (!options_.read_readings_files) continue;
    std::error_code ec;
    if (std::filesystem::is_directory(resolved, ec))
      fail(line_of(*node), field,
           "'" + written + "' is a folder (expected a readings CSV file; looked at '" + resolved.string() + "')");
    if (!std::filesystem::is_regular_file(resolved, ec))
      fail(line_of(*node), field,
           "readings file '" + written + "' not found (looked for '" + resolved.string() + "')");
    ReadingSeries series = read_readings_csv(resolved);
    warnings_.insert(warnings_.end(), series.warnings.begin(), series.warnings.end());
    const std::string kind_name(reading_names()[static_cast<std::size_t>(series.kind)]);
    if (!rig_accepts_reading(rig, series.kind))
      fail(line_of(*node), field,
           "'" + written + "' has a " + kind_name + " column, which a " + rig_kind + " rig does not read (expected " +
               expected_readings() + ")");
    if (named && series.kind != *named)
      fail(line_of(*reading_node), "readings.reading",
           "reading = '" + std::string(reading_names()[static_cast<std::size_t>(*named)]) + "' but '" + written +
               "' has a " + kind_name + " column (expected them to agree; or leave reading out)");
    if (!out.series.empty() && series.kind != out.series.front().kind)
      fail(line_of(*node), field,
           "'" + written + "' has a " + kind_name + " column but '" + listed.front().first + "' has " +
               std::string(reading_names()[static_cast<std::size_t>(out.series.front().kind)]) +
               " (expected every replicate to give the same reading)");
    out.series.push_back(std::move(series));
  }
  if (!out.series.empty()) out.setup.reading = out.series.front().kind;
}

// A final reading the test cannot end at: the sample only spreads from where it started, so a plate reading at or
// inside the ring, a squeeze disc no wider than it started, a zero gap, or no flow at all give no yield stress (the
// plastic-limit relations divide by the spread).
void DescriptionReader::check_final_reading(double value, const toml::node& node, const Rig& rig,
                                            Reading reading) const {
  const std::string shown = quote_for_message(as_written(node));
  auto refuse = [&](const std::string& why) { fail(line_of(node), "readings.final", shown + " " + why); };
  std::visit(
      overloaded{
          [&](const ChannelRig&) {
            if (!(value > 0))
              refuse("is no flow past the gate: the yield stress is then only bounded from below (expected a front > "
                     "0)");
          },
          [&](const PlateRig& p) {
            const double start = reading == Reading::Diameter ? 2.0 * p.ring_radius : p.ring_radius;
            if (!(value > start))
              refuse(fmt::format(
                  "is not beyond the ring's {} {:.4g} m: the sample starts there and only spreads (expected "
                  "a {} > {:.4g} m)",
                  reading == Reading::Diameter ? "diameter" : "radius", start,
                  reading == Reading::Diameter ? "diameter" : "radius", start));
          },
          [&](const SqueezeRig&) {
            if (reading == Reading::Gap && !(value > 0)) refuse("is a closed gap (expected a gap > 0)");
            if (reading != Reading::Gap && !(value > 0)) refuse("is no disc (expected a radius or diameter > 0)");
          },
          [&](const SlumpRig&) {
            if (!(value > 0))
              refuse("is no slump: the yield stress is then only bounded from below (expected a slump > 0)");
          }},
      rig);
}

void DescriptionReader::read_fit(const toml::table& root, TestDescription& out) const {
  const toml::table* fit = table(root, "fit");
  if (!fit) return;
  check_keys(*fit, "fit", kFitKeys);
  if (const toml::node* model = fit->get("model")) {
    const std::string name = name_in(*model, "fit.model", kModelNames, "model");
    if (name != "auto") out.fit.model = law_from_name(name);
  }
  if (const toml::node* origin = fit->get("time_origin"))
    out.fit.fit_time_origin = name_in(*origin, "fit.time_origin", kTimeOrigins, "time_origin") == "fit";
  if (const toml::node* before = fit->get("ignore_before")) {
    out.fit.ignore_before = quantity(*before, "fit.ignore_before", Dimension::Time, Range::NonNegative);
    plausible(out.fit.ignore_before, *before, "fit.ignore_before", plausible::reading_time);
    for (const ReadingSeries& s : out.series)
      if (s.times.back() < out.fit.ignore_before)
        fail(line_of(*before), "fit.ignore_before",
             fmt::format("'{}' leaves no readings of '{}' to fit (its last is at {} s; expected a time before it)",
                         as_written(*before), s.source, s.times.back()));
  }
}

// How far a squeeze reading may lie beyond the sample's starting disc (`start`: its gap, radius or diameter) by
// reading error: three reading uncertainties, and at least 2% of it (common practice, no source).
double squeeze_slack(double start, const std::optional<double>& resolution) {
  return std::max(3.0 * resolution.value_or(0.0), 0.02 * start);
}

// A spreading sample does not recede: a front, radius or diameter that falls (a squeeze gap that opens) by more
// than the reading error below the furthest reading before it is kept with a warning (a typing slip, or a front
// read at another place). Error: six resolutions, so that the noise of an arrested sample's readings about their
// highest one does not warn, 3 mm when none is stated (common practice, no source).
void DescriptionReader::check_direction(const TestDescription& out) const {
  const double slack = 6.0 * out.resolution.value_or(0.5e-3);
  for (const ReadingSeries& s : out.series) {
    if (s.kind == Reading::Slump) continue;
    const double sign = s.kind == Reading::Gap ? -1.0 : 1.0;  // a gap closes
    double furthest = -std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < s.values.size(); ++i) {
      const double v = sign * s.values[i];
      if (v < furthest - slack) {
        warnings_.push_back(InputError(s.source, i < s.lines.size() ? s.lines[i] : 0, std::string(reading_name(s.kind)),
                                       fmt::format("reading {:.4g} mm {} the {:.4g} mm read earlier by more than the "
                                                   "reading error ({:.2g} mm): {}; a typing slip?",
                                                   s.values[i] * 1e3, sign > 0 ? "falls below" : "rises above",
                                                   sign * furthest * 1e3, slack * 1e3,
                                                   sign > 0 ? "a spreading sample does not recede"
                                                            : "the gap only closes under the load"))
                                .what());
        break;  // one warning a series
      }
      furthest = std::max(furthest, v);
    }
  }
}

// A reading the sample's volume cannot give: spread so far that the layer would average less than 0.05 mm, a gap
// wider than the sample is tall, a slump larger than the cylinder. Catches unit slips (a reading in mm labelled
// cm) before any fitting; the thickness bound is common practice, no source.
void DescriptionReader::check_possible(const TestDescription& out) const {
  constexpr double thinnest = 5e-5;  // m
  double largest = 0.0;              // largest reading the rig allows, in the reading's own terms
  std::string why;
  const Reading kind = out.series.empty() ? out.setup.reading : out.series.front().kind;
  std::visit(overloaded{[&](const ChannelRig& c) {
                          largest = c.volume / (c.width * thinnest) - c.reservoir_length;
                          why = "the layer would be thinner than 0.05 mm";
                        },
                        [&](const PlateRig& p) {
                          largest = std::sqrt(p.volume / (std::numbers::pi * thinnest)) *
                                    (kind == Reading::Diameter ? 2.0 : 1.0);
                          why = "the layer would be thinner than 0.05 mm";
                        },
                        [&](const SqueezeRig& q) {
                          const double radius = std::sqrt(q.volume / (std::numbers::pi * thinnest));
                          const double h0 = squeeze_initial_gap(q);
                          largest = kind == Reading::Gap ? h0 + squeeze_slack(h0, out.resolution)
                                                         : radius * (kind == Reading::Diameter ? 2.0 : 1.0);
                          why = kind == Reading::Gap ? "the gap would exceed the gap the load is applied at"
                                                     : "the disc would be thinner than 0.05 mm";
                        },
                        [&](const SlumpRig& s) {
                          largest = s.height;
                          why = "a slump cannot exceed the cylinder height";
                        }},
             out.setup.rig);
  for (const ReadingSeries& s : out.series)
    for (std::size_t i = 0; i < s.values.size(); ++i)
      if (s.values[i] > largest)
        throw InputError(s.source, i < s.lines.size() ? s.lines[i] : 0, std::string(reading_name(s.kind)),
                         fmt::format("reading {:.4g} m is larger than the rig allows for this sample ({:.4g} m: {}); "
                                     "expected a reading in the header's unit",
                                     s.values[i], largest, why));
  // Squeeze discs only widen: a radius or diameter below the disc the sample starts as (its volume at the initial
  // gap) is a unit slip or a wrong initial_gap, and no material could fit it.
  if (const SqueezeRig* q = std::get_if<SqueezeRig>(&out.setup.rig); q && kind != Reading::Gap) {
    const double h0 = squeeze_initial_gap(*q);
    const double start = std::sqrt(q->volume / (std::numbers::pi * h0)) * (kind == Reading::Diameter ? 2.0 : 1.0);
    const double smallest = start - squeeze_slack(start, out.resolution);
    for (const ReadingSeries& s : out.series)
      for (std::size_t i = 0; i < s.values.size(); ++i)
        if (s.values[i] < smallest)
          throw InputError(s.source, i < s.lines.size() ? s.lines[i] : 0, std::string(reading_name(s.kind)),
                           fmt::format("reading {:.4g} m is smaller than the disc the sample starts as ({:.4g} m: "
                                       "its volume at the {} gap of {:.4g} m; the disc only widens); expected a "
                                       "reading in the header's unit, or the rig's initial_gap",
                                       s.values[i], start, q->initial_gap > 0 ? "initial" : "default", h0));
  }
  if (out.final_reading && *out.final_reading > largest)
    fail(0, "readings.final",
         fmt::format("final reading {:.4g} m is larger than the rig allows for this sample ({:.4g} m: {})",
                     *out.final_reading, largest, why));
}

// [capture]: the video and how to scale it (description_file.hpp). Only `spreadfit capture` asks for it.
void DescriptionReader::read_capture(const toml::table& root, TestDescription& out) const {
  const toml::table* capture = table(root, "capture");
  if (!capture)
    fail(0, "capture", "missing table [capture] (expected at least video = \"...\" and the scale, see the README)");
  check_keys(*capture, "capture", kCaptureKeys);
  const CapturedOutline outline = captured_outline(out.setup.rig);
  const bool plate = outline == CapturedOutline::PlateDiameter;
  const bool channel = outline == CapturedOutline::ChannelFront;
  if (outline == CapturedOutline::None)
    fail(line_of(*capture), "capture",
         "a " + std::string(rig_kind_name(out.setup.rig)) +
             " rig has no video capture (expected a plate or a channel rig)");

  CaptureSettings c;
  const toml::node& video = required(*capture, "capture", "video", "the video's file name, such as \"TS12-0412.mp4\"");
  c.video_as_written = text(video, "capture.video");
  c.video_line = line_of(video);
  c.video = (file_.parent_path() / c.video_as_written).lexically_normal();

  const toml::node* scale = capture->get("scale");
  const std::string scale_name = scale ? name_in(*scale, "capture.scale", kScaleNames, "scale") : "board";
  c.scale = scale_name == "board" ? CaptureSettings::Scale::Board
            : scale_name == "ring" ? CaptureSettings::Scale::Ring
                                   : CaptureSettings::Scale::Channel;
  if (c.scale == CaptureSettings::Scale::Ring && !plate)
    fail(line_of(*scale), "capture.scale", "scale = 'ring' needs a plate rig (expected board or channel)");
  if (c.scale == CaptureSettings::Scale::Channel && !channel)
    fail(line_of(*scale), "capture.scale", "scale = 'channel' needs a channel rig (expected board or ring)");

  const toml::node* board = capture->get("board");
  const toml::node* square = capture->get("square");
  if (c.scale == CaptureSettings::Scale::Board) {
    const toml::node& b = required(*capture, "capture", "board",
                                   "the board's inner corners, columns x rows, such as \"9x6\"");
    const std::string written = text(b, "capture.board");
    int columns = 0, rows = 0;
    char x = 0, rest = 0;
    const int got = std::sscanf(written.c_str(), " %d %c %d %c", &columns, &x, &rows, &rest);
    if (got != 3 || (x != 'x' && x != 'X') || columns < 3 || rows < 3 || columns > 60 || rows > 60)
      fail(line_of(b), "capture.board",
           "'" + written + "' is not a board size (expected inner corners as columns x rows, each 3 to 60, such "
                           "as \"9x6\")");
    c.board_columns = columns;
    c.board_rows = rows;
    c.square = quantity(required(*capture, "capture", "square", expected_quantity(Dimension::Length) +
                                                                   ": the side of one board square"),
                        "capture.square", Dimension::Length, Range::Positive);
  } else {
    const toml::node* extra = board ? board : square;
    if (extra)
      fail(line_of(*extra), board ? "capture.board" : "capture.square",
           "applies to scale = 'board' only (this test's scale is '" + scale_name + "')");
  }

  if (const toml::node* release = capture->get("release")) {
    const auto* s = release->as_string();
    const bool word = s && !s->get().empty() && std::isalpha(static_cast<unsigned char>(s->get().front()));
    if (word && s->get() != "auto")
      fail(line_of(*release), "capture.release",
           "unknown release '" + s->get() + "'" + did_you_mean(s->get(), Names{"auto"}) +
               " (expected auto or a time of the video, such as \"2.4 s\")");
    if (!word) c.release = quantity(*release, "capture.release", Dimension::Time, Range::NonNegative);
  }

  const toml::node* every = capture->get("every");
  const toml::node* times = capture->get("times");
  if (every && times) fail(line_of(*times), "capture.times", "give every or times, not both");
  if (every) c.every = quantity(*every, "capture.every", Dimension::Time, Range::Positive);
  if (times) {
    const toml::array* array = times->as_array();
    if (!array || array->empty())
      fail(line_of(*times), "capture.times",
           "expected a non-empty array of times since the release, such as [\"1 s\", \"2 s\", \"5 s\"]");
    for (const toml::node& t : *array) {
      const double value = quantity(t, "capture.times", Dimension::Time, Range::NonNegative);
      if (!c.times.empty() && value <= c.times.back())
        fail(line_of(t), "capture.times",
             fmt::format("'{}' is not after the time before it (expected times strictly increasing)", as_written(t)));
      c.times.push_back(value);
    }
  }
  out.capture = std::move(c);
}

void DescriptionReader::read_spec(const toml::table& root, TestDescription& out) const {
  const toml::table* spec = table(root, "spec");
  if (!spec) return;
  read_spec_table(*spec, "spec", out.spec);
}

std::map<std::string, ProductSpec> DescriptionReader::read_catalogue() const {
  std::error_code ec;
  if (!std::filesystem::is_regular_file(file_, ec)) throw InputError(name_, 0, "", "spec catalogue not found");
  const toml::table root = parse();
  std::map<std::string, ProductSpec> catalogue;
  for (const toml::key* key : keys_in_file_order(root)) {
    const std::string product(key->str());
    if (product.size() > kMaxIdLength)
      fail(line_of(*key), shorten_for_message(product, 24),
           fmt::format("product code of {} characters (expected at most {})", product.size(), kMaxIdLength));
    const toml::node& node = *root.get(key->str());
    if (!node.is_table())
      fail(line_of(*key), product,
           "expected a table [" + product + "] of limits for product " + product + ", got " +
               std::string(type_name(node)));
    const toml::table& table = *node.as_table();
    ProductSpec& spec = catalogue[product];
    read_spec_table(table, product, spec.limits, kCatalogueKeys);
    if (const toml::node* t = table.get("reference_temperature")) {
      const std::string field = product + ".reference_temperature";
      spec.reference_temperature = quantity(*t, field, Dimension::Temperature, Range::Positive);
      if (*spec.reference_temperature < kTemperatureMin || *spec.reference_temperature > kTemperatureMax)
        fail(line_of(*t), field,
             fmt::format("'{}' is {} K, outside -50 to 150 degC (a bare number is in K; write a unit, such as "
                         "\"20 degC\")",
                         shorten_for_message(as_written(*t)), *spec.reference_temperature));
    }
    for (const auto& [energy_key, target] : {std::pair{"activation_energy", &spec.activation_energy},
                                      std::pair{"yield_stress_activation_energy",
                                                &spec.yield_stress_activation_energy}})
      if (const toml::node* e = table.get(energy_key)) {
        const std::string field = product + "." + energy_key;
        *target = quantity(*e, field, Dimension::MolarEnergy, Range::NonNegative);
        plausible(*target, *e, field, plausible::activation_energy);
      }
    if (const toml::node* prior = table.get("flow_index_prior")) {
      // [typical, spread]: a normal prior on the flow index, from the formulation's earlier batches.
      const std::string field = product + ".flow_index_prior";
      const toml::array* pair = prior->as_array();
      if (!pair || pair->size() != 2)
        fail(line_of(*prior), field, "expected [typical, spread], e.g. flow_index_prior = [0.4, 0.05]");
      const double typical = quantity(*pair->get(0), field, Dimension::Dimensionless, Range::Positive);
      const double spread = quantity(*pair->get(1), field, Dimension::Dimensionless, Range::Positive);
      if (typical < 0.1 || typical > 2.0)
        fail(line_of(*prior), field, fmt::format("typical flow index {:g}: expected a value in [0.1, 2]", typical));
      if (spread < 0.005 || spread > 1.0)
        fail(line_of(*prior), field,
             fmt::format("spread {:g}: expected a standard deviation in [0.005, 1] (a smaller one would fix the "
                         "flow index outright)",
                         spread));
      spec.flow_index_prior = std::pair{typical, spread};
    }
    if ((spec.activation_energy > 0 || spec.yield_stress_activation_energy > 0) && !spec.reference_temperature)
      fail(line_of(*key), product,
           "activation energies need a reference_temperature (expected e.g. reference_temperature = \"20 degC\")");
  }
  return catalogue;
}

void DescriptionReader::read_spec_table(const toml::table& spec, const std::string& section,
                                        std::vector<SpecLimit>& limits, const Names& allowed) const {
  check_keys(spec, section, allowed);
  for (const toml::key* key : keys_in_file_order(spec)) {
    if (std::find(kSpecKeys.begin(), kSpecKeys.end(), key->str()) == kSpecKeys.end()) continue;
    const toml::node& node = *spec.get(key->str());
    const std::string parameter(key->str());
    const std::string field = section + "." + parameter;
    // A spec key is a row of the parameter table (kSpecKeys), which gives its dimension and example.
    const ParameterInfo& row = parameter_info(*parameter_from_name(parameter));
    const Dimension d = row.dimension;
    const std::string_view example = row.spec_example;
    const toml::array* bounds = node.as_array();
    if (!bounds || bounds->size() != 2)
      fail(line_of(node), field,
           "expected [low, high], two values such as " + std::string(example) + ", got " +
               (bounds ? std::to_string(bounds->size()) + (bounds->size() == 1 ? " value" : " values")
                       : std::string(type_name(node))));
    const toml::node& low_node = *bounds->get(0);
    const toml::node& high_node = *bounds->get(1);
    SpecLimit limit;
    limit.parameter = parameter;
    limit.low = quantity(low_node, field, d, Range::NonNegative);
    limit.high = quantity(high_node, field, d, Range::NonNegative);
    limit.line = line_of(node);
    if (limit.low > limit.high)
      fail(line_of(node), field,
           "low bound '" + as_written(low_node) + "' is above high bound '" + as_written(high_node) +
               "' (expected [low, high] with low <= high)");
    limits.push_back(std::move(limit));
  }
}

TestDescription DescriptionReader::read() {
  std::error_code ec;
  if (!std::filesystem::is_regular_file(file_, ec))
    throw InputError(name_, 0, "",
                     std::filesystem::exists(file_, ec) ? "not a regular file (expected a test description, .toml)"
                                                        : "test description not found");
  const toml::table root = parse();

  // Top level: only the five tables. A bare key here most often lost its table header.
  for (const toml::key* key_ptr : keys_in_file_order(root)) {
    const toml::key& key = *key_ptr;
    const std::string_view k = key.str();
    if (std::find(kTables.begin(), kTables.end(), k) != kTables.end()) continue;
    for (const auto& [section, keys] : {std::pair{"sample", &kSampleKeys}, std::pair{"rig", &kChannelKeys},
                                        std::pair{"rig", &kPlateKeys}, std::pair{"rig", &kSqueezeKeys},
                                        std::pair{"rig", &kSlumpKeys}, std::pair{"readings", &kReadingsKeys},
                                        std::pair{"fit", &kFitKeys}, std::pair{"spec", &kSpecKeys},
                                        std::pair{"capture", &kCaptureKeys}})
      if (std::find(keys->begin(), keys->end(), k) != keys->end())
        fail(line_of(key), std::string(k),
             "key '" + std::string(k) + "' is outside any table (expected it under [" + section + "])");
    fail(line_of(key), std::string(k), "unknown table [" + std::string(k) + "]" + did_you_mean(k, kTables));
  }

  TestDescription out;
  out.path = file_;
  warnings_.clear();
  read_sample(root, out);
  out.setup.rig = read_rig(root);
  out.setup.density = out.density;
  read_readings(root, out);
  check_possible(out);
  check_direction(out);
  read_fit(root, out);
  read_spec(root, out);
  if (options_.read_capture) read_capture(root, out);
  out.warnings = warnings_;
  return out;
}

}  // namespace

std::map<std::string, ProductSpec> load_spec_catalogue(const std::filesystem::path& file) {
  return DescriptionReader(file).read_catalogue();
}

CapturedOutline captured_outline(const Rig& rig) {
  return std::visit(overloaded{[](const ChannelRig&) { return CapturedOutline::ChannelFront; },
                               [](const PlateRig&) { return CapturedOutline::PlateDiameter; },
                               [](const SqueezeRig&) { return CapturedOutline::None; },
                               [](const SlumpRig&) { return CapturedOutline::None; }},
                    rig);
}

TestDescription load_test_description(const std::filesystem::path& file, const LoadOptions& options) {
  return DescriptionReader(file, options).read();
}

}  // namespace spreadfit::io
