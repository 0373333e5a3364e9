#include "src/cli/output_paths.hpp"

#include <unistd.h>

#include <system_error>

#include "src/io/input_error.hpp"

namespace spreadfit::cli {

namespace {

namespace fs = std::filesystem;

/// The path with symbolic links, "." and ".." resolved as far as it exists.
fs::path resolved(const fs::path& path) {
  std::error_code ec;
  fs::path out = fs::weakly_canonical(fs::absolute(path, ec), ec);
  return ec ? fs::absolute(path).lexically_normal() : out;
}

bool same_file(const fs::path& a, const fs::path& b) {
  if (resolved(a) == resolved(b)) return true;
  std::error_code ec;
  return fs::exists(a, ec) && fs::exists(b, ec) && fs::equivalent(a, b, ec);  // hard links
}

[[noreturn]] void fail(const RunFile& output, const std::string& message) {
  throw io::InputError("", 0, output.role + " " + output.path.string(), message);
}

}  // namespace

void check_output_folder(const fs::path& folder, const std::string& option) {
  std::error_code ec;
  const fs::file_status status = fs::status(folder, ec);
  const std::string field = option + " " + folder.string();
  if (!fs::exists(status))
    throw io::InputError("", 0, field, "folder does not exist (expected an existing folder; it is not created)");
  if (!fs::is_directory(status)) throw io::InputError("", 0, field, "not a folder (expected a folder)");
  if (::access(folder.c_str(), W_OK | X_OK) != 0)
    throw io::InputError("", 0, field, "folder is not writable (expected a folder this user may write to)");
}

void check_output_paths(const std::vector<RunFile>& inputs, const std::vector<RunFile>& outputs) {
  for (std::size_t i = 0; i < outputs.size(); ++i) {
    const RunFile& out = outputs[i];
    if (out.path.empty()) fail(out, "empty file name (expected a file path such as out/result.json)");
    for (const RunFile& in : inputs)
      if (same_file(out.path, in.path))
        fail(out, "is an input of this run, the " + in.role + " '" + in.path.string() +
                      "' (expected another file; nothing was written)");
    for (std::size_t k = 0; k < i; ++k)
      if (same_file(out.path, outputs[k].path))
        fail(out, "is also the output of " + outputs[k].role +
                      " (expected a file of its own for each output; nothing was written)");
    std::error_code ec;
    if (fs::is_directory(out.path, ec)) fail(out, "is a folder (expected a file name)");
    const fs::path folder = out.path.has_parent_path() ? out.path.parent_path() : fs::path(".");
    check_output_folder(folder, out.role);
  }
}

}  // namespace spreadfit::cli
