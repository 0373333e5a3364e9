// Test description: one TOML file per bench test (README "Test description"), read into SI units and
// checked before any physics runs.
//
//   [sample]   id (required), product, density (required), temperature, site (the lab or plant, for a shared
//              history), tested (when the test was run: a date or date-time, test_time.hpp)
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
//   [capture]  optional; read only when LoadOptions::read_capture is set (`spreadfit capture`), otherwise
//              accepted and left alone: video (path relative to this file), scale = board | ring | channel
//              (default board), board = "9x6" (inner corners, columns x rows) and square = "10 mm" (with
//              scale = board), release = "auto" or a time of the video ("2.4 s"; default auto), every = "1 s"
//              (default 1 s) or times = ["1 s", ...] (since the release; not both)
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
#include <utility>
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

/// What `spreadfit capture` measures on a rig's video: the plate's spread diameter, the channel's front past the
/// gate, or nothing (a squeeze or slump test has no outline to follow). One answer per rig kind, by exhaustive visit.
enum class CapturedOutline { None, PlateDiameter, ChannelFront };
CapturedOutline captured_outline(const Rig& rig);

/// The [capture] table: how `spreadfit capture` reads the test's video.
struct CaptureSettings {
  enum class Scale { Board, Ring, Channel };
  std::filesystem::path video;       ///< resolved against the TOML file's folder
  std::string video_as_written;      ///< as the TOML wrote it, for messages and the CSV's comments
  int video_line = 0;                ///< TOML line of `video`, for messages
  Scale scale = Scale::Board;        ///< board: a printed chessboard on the plate plane; ring: the ring's inner
                                     ///< radius (plate only); channel: the channel's width (channel only)
  int board_columns = 0;             ///< inner corners along the board's long side (scale = board)
  int board_rows = 0;                ///< inner corners along the other side
  double square = 0;                 ///< [m] side of one board square (scale = board)
  std::optional<double> release;     ///< [s] time of the video at the release; nullopt = detect it
  double every = 1.0;                ///< [s] reading interval (when `times` is empty), > 0
  std::vector<double> times;         ///< [s] since the release, strictly increasing; empty = every `every`
};

/// What load_test_description reads besides the rig and the sample.
struct LoadOptions {
  /// false: the readings files [readings] names are listed in TestDescription::readings_files and not opened
  /// (for `capture`, which writes them).
  bool read_readings_files = true;
  /// true: the [capture] table is read and checked into TestDescription::capture (an error when it is missing).
  bool read_capture = false;
};

struct TestDescription {
  std::filesystem::path path;  ///< the TOML file as given
  std::string sample_id, product;  ///< product empty when not given
  std::string site;                ///< [sample] site, the lab or plant; empty when not given
  std::string tested;              ///< [sample] tested in canonical form (test_time.hpp); empty when not given
  double density = 0;                     ///< [kg/m^3]
  std::optional<double> temperature;      ///< [K]
  TestSetup setup;                        ///< rig + density + reading kind
  std::vector<ReadingSeries> series;      ///< one per readings file; empty for final-only or no readings
  std::vector<std::filesystem::path> readings_files;  ///< the files [readings] names, resolved, in file order
  std::optional<CaptureSettings> capture;  ///< only with LoadOptions::read_capture
  std::optional<double> final_reading;    ///< [m], final-only test
  std::optional<double> resolution;       ///< [m], reading standard uncertainty
  FitSettings fit;
  std::vector<SpecLimit> spec;            ///< in file order
  /// Values kept but unusual (io/plausible_ranges.hpp), "FILE:LINE: FIELD: message" each, readings files' too.
  std::vector<std::string> warnings;
};

/// Reads, converts and checks a test description and the readings files it names. Throws InputError.
TestDescription load_test_description(const std::filesystem::path& file, const LoadOptions& options = {});

/// One product of a spec catalogue: limits that apply at the reference temperature, and the Arrhenius activation
/// energies that take a test's parameters there (models/temperature.hpp).
struct ProductSpec {
  std::vector<SpecLimit> limits;
  std::optional<double> reference_temperature;  ///< [K]; limits apply at this temperature
  double activation_energy = 0;                 ///< [J/mol] for viscosity / consistency; 0 = no shift
  double yield_stress_activation_energy = 0;    ///< [J/mol] for the yield stress; 0 = no shift
  /// flow_index_prior = [typical, spread]: the formulation's flow index and its batch-to-batch standard deviation
  std::optional<std::pair<double, double>> flow_index_prior;
};

/// A product spec catalogue (e.g. specs.toml): one table per product code, each holding limits written as in a
/// test's [spec], e.g. [TS12] yield_stress = ["20 Pa", "35 Pa"], and optionally reference_temperature,
/// activation_energy and yield_stress_activation_energy. Throws InputError with file, line and field.
std::map<std::string, ProductSpec> load_spec_catalogue(const std::filesystem::path& file);

// The rig's kind name and default reading are the rig's own (models/rig.hpp); named here too for the callers that
// reach them through io.
using ::spreadfit::default_reading;
using ::spreadfit::rig_kind_name;

}  // namespace spreadfit::io
