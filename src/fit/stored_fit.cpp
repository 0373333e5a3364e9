#include "src/fit/stored_fit.hpp"

#include <cmath>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>

#include "src/io/input_error.hpp"

namespace spreadfit {

FitResult load_fitted_material(const std::filesystem::path& path) {
  const std::string file = path.string();
  std::ifstream in(path);
  if (!in) throw io::InputError(file, 0, "", "result file not found or unreadable (expected a spreadfit result JSON)");
  nlohmann::json j;
  try {
    in >> j;
  } catch (const nlohmann::json::parse_error& e) {
    throw io::InputError(file, 0, "", std::string("not JSON: ") + e.what());
  }
  if (j.is_array()) {
    if (j.size() != 1)
      throw io::InputError(file, 0, "", "holds " + std::to_string(j.size()) +
                                            " results (expected one; write each material with --out-dir)");
    j = j.front();
  }
  if (!j.contains("model") || !j["model"].is_string())
    throw io::InputError(file, 0, "model", "no fitted model: the fit failed, so there is no material to predict with");
  const auto law = law_from_name(j["model"].get<std::string>());
  if (!law) throw io::InputError(file, 0, "model", "unknown model '" + j["model"].get<std::string>() + "'");
  const auto* block = j.contains("fit") && j["fit"].contains("log_space") ? &j["fit"]["log_space"] : nullptr;
  if (!block)
    throw io::InputError(file, 0, "fit.log_space",
                         "missing (a result from a closed-form or older fit: refit with this version)");
  FitResult r;
  r.law = *law;
  r.status = FitStatus::Converged;
  try {
    const auto names = (*block)["parameters"].get<std::vector<std::string>>();
    const auto estimate = (*block)["estimate"].get<std::vector<double>>();
    const auto& cov = (*block)["covariance"];
    std::vector<int> keep;  // material parameters only
    for (std::size_t i = 0; i < names.size(); ++i)
      if (names[i] != "time_origin") keep.push_back(int(i));
    r.estimate.resize(Eigen::Index(keep.size()));
    r.covariance.resize(Eigen::Index(keep.size()), Eigen::Index(keep.size()));
    for (std::size_t a = 0; a < keep.size(); ++a) {
      r.names.push_back(names[std::size_t(keep[a])]);
      r.estimate[Eigen::Index(a)] = estimate.at(std::size_t(keep[a]));
      for (std::size_t b = 0; b < keep.size(); ++b) {
        const auto& v = cov.at(std::size_t(keep[a])).at(std::size_t(keep[b]));
        r.covariance(Eigen::Index(a), Eigen::Index(b)) =
            v.is_null() ? std::numeric_limits<double>::infinity() : v.get<double>();
      }
    }
  } catch (const nlohmann::json::exception& e) {
    throw io::InputError(file, 0, "fit.log_space", std::string("malformed: ") + e.what());
  }
  for (std::size_t i = 0; i < r.names.size(); ++i) {
    const double v = std::exp(r.estimate[Eigen::Index(i)]);
    if (r.names[i] == "yield_stress") r.material.yield_stress = v;
    else if (r.names[i] == "flow_index") r.material.flow_index = v;
    else r.material.consistency = v;
  }
  r.time_origins = {0.0};
  return r;
}

}  // namespace spreadfit
