// Test description: one TOML file per bench test (interface.md "Test description"), read into SI units and
// checked before any physics runs.
//
//   [sample]   id (required), product, density (required), temperature
//   [rig]      kind = channel | plate | squeeze | slump, and the rig's fields:
//                channel: width, reservoir_length, volume or fill_height, side_wall_drag (default true)
//                plate:   ring_radius, volume or fill_height
//                squeeze: volume, load (a mass) or force, initial_gap (optional)
//                slump:   radius, height
//   [readings] optional; at most one of
//                file = "a.csv"            one readings CSV, relative to this TOML file's folder
//                files = ["a.csv", ...]    replicates: each its own series, all of the same reading
//                final = "2.9 cm"          final-only test (the sample had stopped): the arrested reading
//              and optionally
//                reading = "diameter"      which reading `final` (or the simulated output) is; without it the
//                                          rig's own: channel front, plate radius, squeeze gap, slump slump.
//                                          With file(s) it may be given and must match the CSV column.
//                resolution = "1 mm"       standard uncertainty of one reading
//   [fit]      optional: model (newtonian | power-law | bingham | herschel-bulkley | auto; default auto),
//              time_origin (fit | zero; default fit), ignore_before (a time; default 0: readings at earlier
//              times are not fitted)
//   [spec]     optional: viscosity | yield_stress | consistency | flow_index = [low, high], both quantities,
//              inclusive, low <= high
//
// A quantity is a TOML number in SI units or a string "value unit" (units.hpp). Derived values:
//   channel fill_height h: volume = h * width * reservoir_length
//   plate fill_height h:   volume = h * pi * ring_radius^2
//   squeeze load m:        force = m * 9.80665 m/s^2 (standard gravity, CGPM 1901)
// Plausibility limits that catch a unit slip (common practice, no source): density 100 to 3000 kg/m^3 (a bare
// 1.1 meant g/mL); temperature -50 degC to 150 degC (a bare 21.5 meant degC, not K). Rig sizes, volumes, loads,
// resolution, times and activation energies have a possible range (outside: refused) and a usual range (outside:
// kept, with a warning in TestDescription::warnings), listed in io/plausible_ranges.hpp. Ids and product codes are
// at most 64 characters without control characters; a final reading must be a spread the rig can end at (a plate
// beyond the ring, a channel front, slump or gap above 0).
//
// Every error is an InputError "FILE:LINE: FIELD: message" with the TOML line of the offending key or value
// (the table's header line for a missing key). Unknown tables, keys and names suggest the nearest valid one.
// Errors inside a readings CSV are reported against the CSV file, line and column.
#pragma once

#include <filesystem>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "models/rheology.hpp"
#include "models/rig.hpp"
#include "src/io/readings_csv.hpp"

namespace spreadfit::io {

/// One [spec] limit: the result passes when low <= value <= high.
struct SpecLimit {
  std::string parameter;  ///< viscosity | yield_stress | consistency | flow_index
  double low = 0, high = 0;  ///< SI units of the parameter
  int line = 0;           ///< TOML line, for messages
};

struct FitSettings {
  std::optional<Law> model;      ///< nullopt = auto (choose by AICc)
  bool fit_time_origin = true;   ///< time_origin = "fit": the release time is a fitted parameter
  double ignore_before = 0;      ///< [s]; readings at times < ignore_before are not fitted
};

struct TestDescription {
  std::filesystem::path path;  ///< the TOML file as given
  std::string sample_id, product;  ///< product empty when not given
  double density = 0;                     ///< [kg/m^3]
  std::optional<double> temperature;      ///< [K]
  TestSetup setup;                        ///< rig + density + reading kind
  std::vector<ReadingSeries> series;      ///< one per readings file; empty for final-only or no readings
  std::optional<double> final_reading;    ///< [m], final-only test
  std::optional<double> resolution;       ///< [m], reading standard uncertainty
  FitSettings fit;
  std::vector<SpecLimit> spec;            ///< in file order
  /// Values kept but unusual (io/plausible_ranges.hpp), "FILE:LINE: FIELD: message" each, readings files' too.
  std::vector<std::string> warnings;
};

/// Reads, converts and checks a test description and the readings files it names. Throws InputError.
TestDescription load_test_description(const std::filesystem::path& file);

/// One product of a spec catalogue: limits that apply at the reference temperature, and the Arrhenius activation
/// energies that take a test's parameters there (models/temperature.hpp).
struct ProductSpec {
  std::vector<SpecLimit> limits;
  std::optional<double> reference_temperature;  ///< [K]; limits apply at this temperature
  double activation_energy = 0;                 ///< [J/mol] for viscosity / consistency; 0 = no shift
  double yield_stress_activation_energy = 0;    ///< [J/mol] for the yield stress; 0 = no shift
};

/// A product spec catalogue (e.g. specs.toml): one table per product code, each holding limits written as in a
/// test's [spec], e.g. [TS12] yield_stress = ["20 Pa", "35 Pa"], and optionally reference_temperature,
/// activation_energy and yield_stress_activation_energy. Throws InputError with file, line and field.
std::map<std::string, ProductSpec> load_spec_catalogue(const std::filesystem::path& file);

/// Kind name as in [rig] kind: channel | plate | squeeze | slump.
std::string_view rig_kind_name(const Rig& rig);
/// The reading a rig gives when none is named: channel front, plate radius, squeeze gap, slump slump.
Reading default_reading(const Rig& rig);
/// Whether a rig can give that reading: channel front; plate radius | diameter; squeeze gap | radius |
/// diameter; slump slump.
bool rig_has_reading(const Rig& rig, Reading reading);

}  // namespace spreadfit::io
