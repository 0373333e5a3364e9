// What a video can fail to show: the board, the sample, the release. These are not bad input (the test
// description and the video file are fine) but things not found in the video, so the command line maps them to
// exit code 3 (README, "Exit codes") with the one-line message, and no readings file is written.
#pragma once

#include <fmt/format.h>

#include <stdexcept>
#include <string>

namespace spreadfit::capture {

/// Something the capture looked for and did not find in the video; what() is one line naming the video.
class NotFoundInVideo : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// A time in the video as capture's messages write it, e.g. "2.40 s".
inline std::string seconds_text(double t) { return fmt::format("{:.2f} s", t); }

}  // namespace spreadfit::capture
