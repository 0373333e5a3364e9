// A fitted material read back from its result JSON (the "fit.log_space" block written by result_json), so that
// its parameters and their uncertainty can be carried to another rig. Release times belong to the original test
// and are dropped: a prediction starts at the other rig's release.
#pragma once

#include <filesystem>

#include "src/fit/fit_types.hpp"

namespace spreadfit::fit {

/// Throws io::InputError naming the file and field for a result that failed, lacks the block, or is malformed.
FitResult load_fitted_material(const std::filesystem::path& result_json);

}  // namespace spreadfit::fit
