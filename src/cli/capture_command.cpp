#include "src/cli/capture_command.hpp"

#include <fmt/format.h>

#include <stdexcept>
#include <string>
#include <system_error>

#include "src/capture/audit_images.hpp"
#include "src/capture/capture.hpp"
#include "src/capture/capture_error.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/description_file.hpp"

namespace spreadfit::cli {

namespace {

std::string csv_text(const io::TestDescription& test, const io::CaptureSettings& settings,
                     const capture::CaptureResult& r) {
  std::string text =
      fmt::format("# capture of {} from '{}': {}x{}, {} frames read, {:.2f} frames/s ({})\n", test.sample_id,
                  settings.video_as_written, r.width, r.height, r.frames, r.frame_rate,
                  r.timestamps_from_container ? fmt::format("container timestamps; {:.2f} announced", r.nominal_rate)
                                              : std::string("nominal rate: no timestamps in the video"));
  text += fmt::format("# release: {:.3f} s into the video ({})\n", r.release_time,
                      r.release_detected ? "detected: the first frame that moves" : "as [capture] release gives");
  text += fmt::format("# scale: {:.3f} px/mm at the sample ({})\n", r.pixels_per_mm, r.scale_source);
  for (const std::string& w : r.warnings) text += "# warning: " + w + "\n";
  text += r.reading == Reading::Diameter ? "time [s],diameter [mm]\n" : "time [s],front [mm]\n";
  for (const capture::CapturedReading& reading : r.readings)
    text += fmt::format("{:.3f},{:.2f}\n", reading.time, reading.value);
  return text;
}

}  // namespace

int run_capture_command(const CaptureCommandOptions& options, std::ostream& out, std::ostream& err) {
  io::LoadOptions load;
  load.read_readings_files = false;
  load.read_capture = true;
  const io::TestDescription test = io::load_test_description(options.test, load);
  io::CaptureSettings settings = *test.capture;
  const std::string toml = options.test.string();

  std::filesystem::path csv;
  if (options.out) {
    csv = *options.out;
  } else if (test.readings_files.size() == 1) {
    csv = test.readings_files.front();
  } else {
    throw io::InputError(toml, 0, test.readings_files.empty() ? "readings.file" : "readings.files",
                         test.readings_files.empty()
                             ? "no readings file to write (expected [readings] file = \"...\", or --out FILE.csv)"
                             : "several readings files listed (capture writes one: expected --out FILE.csv)");
  }

  std::error_code ec;
  if (options.video) {
    settings.video = *options.video;
    settings.video_as_written = options.video->string();
    if (!std::filesystem::is_regular_file(settings.video, ec))
      throw io::InputError("command line", 0, "--video", "video '" + settings.video_as_written + "' not found");
  } else if (!std::filesystem::is_regular_file(settings.video, ec)) {
    throw io::InputError(
        toml, settings.video_line, "capture.video",
        "video '" + settings.video_as_written + "' not found (looked for '" + settings.video.string() + "')");
  }

  capture::CaptureResult result;
  try {
    result = capture::capture_readings(settings, test.setup.rig);
  } catch (const capture::NotFoundInVideo& e) {
    throw capture::NotFoundInVideo(settings.video_as_written + ": " + e.what());
  } catch (const std::invalid_argument& e) {
    const std::string message = e.what();
    const auto colon = message.find(": ");
    const bool field = message.rfind("capture", 0) == 0 && colon != std::string::npos;
    throw io::InputError(toml, 0, field ? message.substr(0, colon) : "", field ? message.substr(colon + 2) : message);
  } catch (const std::runtime_error& e) {  // the video reader: the file is no video it can decode
    throw io::InputError(toml, settings.video_line, "capture.video", "'" + settings.video_as_written + "' " + e.what());
  }

  if (options.check)
    capture::write_audit_images(result, *options.check, test.sample_id.empty() ? "capture" : test.sample_id);
  io::write_file_atomically(csv, csv_text(test, settings, result));
  for (const std::string& w : result.warnings)
    err << "spreadfit: warning: " << settings.video_as_written << ": " << w << '\n';
  out << fmt::format("{}: {} readings from '{}' (release at {:.3f} s, {}; {:.2f} px/mm, {}) -> {}\n", test.sample_id,
                     result.readings.size(), settings.video_as_written, result.release_time,
                     result.release_detected ? "detected" : "given", result.pixels_per_mm, result.scale_source,
                     csv.string());
  return to_int(ExitCode::Done);
}

}  // namespace spreadfit::cli
