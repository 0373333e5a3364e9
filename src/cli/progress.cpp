#include "src/cli/progress.hpp"

#include <unistd.h>

namespace spreadfit::cli {

bool progress_wanted() { return ::isatty(STDERR_FILENO) == 1; }

void progress(std::ostream& err, std::string_view line) {
  if (progress_wanted()) err << "spreadfit: " << line << '\n' << std::flush;
}

}  // namespace spreadfit::cli
