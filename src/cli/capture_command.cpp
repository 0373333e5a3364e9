#include "src/cli/capture_command.hpp"

#include <fmt/format.h>

#include <stdexcept>
#include <string>
#include <system_error>
#include <memory>

#include "src/capture/audit_images.hpp"
#include "src/capture/capture.hpp"
#include "src/capture/capture_error.hpp"
#include "src/cli/exit_codes.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/io/description_file.hpp"
#include "src/cli/path_option.hpp"

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

CommandRegistration add_capture_command(CLI::App& app) {
  struct Given {
    std::string test;
    PathOption video, out, check;
  };
  const auto given = std::make_shared<Given>();
  CLI::App* capture = app.add_subcommand(
      "capture", "Turn a video of the test, taken from above, into the readings CSV that [readings] file names.");
  capture->add_option("TEST.toml", given->test, "Test description (TOML) with a [capture] table")
      ->required()
      ->type_name("");
  given->video.add_to(*capture, "--video", "FILE", "The video (instead of [capture] video)");
  given->out.add_to(*capture, "--out", "FILE.csv", "Write the readings to FILE.csv (instead of [readings] file)");
  given->check.add_to(*capture, "--check", "DIR",
                      "Write audit images (frames with the outline found, a contact sheet, the curve) into DIR");
  return {capture, [given](std::ostream& out, std::ostream& err) {
            CaptureCommandOptions options;
            options.test = given->test;
            options.video = given->video.get();
            options.out = given->out.get();
            options.check = given->check.get();
            return run_capture_command(options, out, err);
          }};
}

}  // namespace spreadfit::cli
