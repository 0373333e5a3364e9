// Writing an output file all at once: readers (and a crash) see either the file as it was or the whole new one,
// never a part. Every file spreadfit writes (results, plots, tables) goes through here, so that a failed run leaves
// no half-written result for a plant system to pick up (README, "Exit codes", 2: "no output file written").
//
// How: the contents go to a hidden temporary file in the same folder (".NAME.tmp-PID-N"), which is flushed to the
// disk and then renamed over NAME; rename within one file system replaces the name in one step (POSIX rename()).
// A temporary file is removed on every error this code sees; only a process killed between creating and renaming
// it can leave one behind, and it never carries the final name; the next write of the same file removes such
// leftovers of processes that no longer run. POSIX systems only.
#pragma once

#include <filesystem>
#include <string_view>

namespace spreadfit::io {

/// Writes `contents` byte for byte to `file`, replacing the file if it exists (its permission bits are kept;
/// a new file gets the usual ones, 0666 less the umask). The folder must exist: it is not created.
///
/// Throws InputError located at `file` (no line, no field) when the folder is missing or is not a folder, `file`
/// names a folder, or creating, writing, flushing or renaming fails (no permission, disk full); the message says
/// which, e.g.
///   out/TS12.json: cannot write: folder 'out' does not exist (expected an existing folder; it is not created)
/// After an error `file` is as it was before the call, and no temporary file is left.
void write_file_atomically(const std::filesystem::path& file, std::string_view contents);

}  // namespace spreadfit::io
