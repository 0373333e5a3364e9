#include "src/cli/history_command.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <vector>

#include "src/cli/exit_codes.hpp"
#include "src/io/atomic_file.hpp"
#include "src/io/input_error.hpp"
#include "src/qc/control_chart.hpp"

namespace spreadfit::cli {

namespace {

using history::StoredResult;

/// Parameters in the order reports list them; others follow in the order first recorded.
constexpr const char* kParameterOrder[] = {"yield_stress", "viscosity", "consistency", "flow_index"};

/// The parameter preferred for --chart.
constexpr const char* kChartParameter = "yield_stress";

struct Column {
  std::string name, unit;
};

const std::string& name_of(const StoredResult::value_type_unused*) = delete;  // (no such type; see below)

}  // namespace
}  // namespace spreadfit::cli
