// Progress lines on stderr for work that can take more than a few seconds (a batch of materials, plan --check's
// refits, a translate map, predict's parameter draws). Only for a person watching: they are written when stderr is
// a terminal, never into logs or pipes a plant system reads, so a scripted run's stderr stays as the README shows.
#pragma once

#include <ostream>
#include <string_view>

namespace spreadfit::cli {

/// True when stderr is a terminal.
bool progress_wanted();

/// Writes "spreadfit: LINE" and a line end to `err`, flushed, when progress_wanted().
void progress(std::ostream& err, std::string_view line);

}  // namespace spreadfit::cli
