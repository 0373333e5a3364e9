// Output-path safety for a run: checked before any work, so that a run never overwrites its own input, never
// writes two outputs to one file, and never finds out after a long fit that an output cannot be written.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

namespace spreadfit::cli {

/// A file of a run and what it is, as messages name it: "--json", "--out-dir", "test description", "readings".
struct RunFile {
  std::filesystem::path path;
  std::string role;
};

/// Throws io::InputError (exit 2) naming the output's option when an output is the same file as an input or as
/// another output (compared after resolving symbolic links, ".." and hard links), or when its folder is missing,
/// is not a folder or is not writable, or the output names a folder. `inputs` may list a file twice.
void check_output_paths(const std::vector<RunFile>& inputs, const std::vector<RunFile>& outputs);

/// Throws io::InputError naming `option` unless `folder` exists, is a folder and is writable.
void check_output_folder(const std::filesystem::path& folder, const std::string& option);

}  // namespace spreadfit::cli
