#include "src/version.hpp"

namespace spreadfit {
std::string_view software_version() { return SPREADFIT_VERSION; }
}  // namespace spreadfit
