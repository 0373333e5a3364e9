// Images for a technician to audit a capture (`spreadfit capture --check DIR`):
//   <stem>-<n>-<time>s.png   a few readings' frames with the outline found (green), the reference (the board's
//                             corners, the sample's outline at the release in blue, or the channel's gate line in
//                             red) and the reading written on the frame
//   <stem>-sheet.png         those frames side by side, smaller
//   <stem>-curve.png         the captured readings against time
// Every file is written whole or not at all (io::write_file_atomically).
#pragma once

#include <filesystem>
#include <string>
#include <vector>

#include "src/capture/capture.hpp"

namespace spreadfit::capture {

/// Writes the audit images into `dir` (created when missing) and returns their paths. `frames` is how many
/// readings get an image of their own (spread evenly, first and last included). Throws io::InputError when a file
/// cannot be written.
std::vector<std::filesystem::path> write_audit_images(const CaptureResult& result, const std::filesystem::path& dir,
                                                      const std::string& stem, int frames = 6);

}  // namespace spreadfit::capture
