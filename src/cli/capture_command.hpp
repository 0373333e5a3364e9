// `spreadfit capture`: readings from a video of the test (README).
//
//   spreadfit capture TEST.toml [--video FILE] [--out FILE.csv] [--check DIR]
//
// Reads the test description's [rig] and [capture] tables (not its readings files: this command writes them),
// captures the readings from the video (src/capture/capture.hpp) and writes the readings CSV that [readings]
// file names, or --out:
//
//   # capture of TS12-0412 from 'TS12-0412.mp4': 1280x720, 1800 frames read, 30.00 frames/s (...)
//   # release: 2.367 s into the video (detected: the first frame that moves)
//   # scale: 4.210 px/mm at the sample (board 9x6, 10 mm squares, tilt corrected)
//   # warning: ...                 <- each warning, also printed on stderr
//   time [s],diameter [mm]         <- front [mm] on a channel
//   1.001,95.32                    <- the frame's own time since the release
//
// --video replaces [capture] video (a path from the working folder); --check DIR writes the audit images
// (src/capture/audit_images.hpp). A summary line goes to `out`, warnings to `err`.
// Bad input throws io::InputError (exit 2); what the video does not show throws capture::NotFoundInVideo
// (exit 3). Either way no readings file is written.
#pragma once

#include <filesystem>
#include <optional>
#include <ostream>

#include "src/cli/command_registration.hpp"

namespace spreadfit::cli {

struct CaptureCommandOptions {
  std::filesystem::path test;                  ///< test description (TOML)
  std::optional<std::filesystem::path> video;  ///< --video
  std::optional<std::filesystem::path> out;    ///< --out
  std::optional<std::filesystem::path> check;  ///< --check
};

int run_capture_command(const CaptureCommandOptions& options, std::ostream& out, std::ostream& err);

/// Declares `spreadfit capture` and its options on `app`.
CommandRegistration add_capture_command(CLI::App& app);

}  // namespace spreadfit::cli
