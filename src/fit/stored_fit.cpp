#include "src/fit/stored_fit.hpp"

#include <cmath>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <stdexcept>

#include "src/fit/parameter_names.hpp"
#include "src/fit/prediction_band.hpp"
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
    r.names = (*block)["parameters"].get<std::vector<std::string>>();
    const auto estimate = (*block)["estimate"].get<std::vector<double>>();
    const auto& cov = (*block)["covariance"];
    const Eigen::Index p = Eigen::Index(r.names.size());
    if (Eigen::Index(estimate.size()) != p) throw io::InputError(file, 0, "fit.log_space", "estimate size mismatch");
    r.estimate = Eigen::Map<const Eigen::VectorXd>(estimate.data(), p);
    r.covariance.resize(p, p);
    for (Eigen::Index a = 0; a < p; ++a)
      for (Eigen::Index b = 0; b < p; ++b) {
        const auto& v = cov.at(std::size_t(a)).at(std::size_t(b));
        r.covariance(a, b) = v.is_null() ? std::numeric_limits<double>::infinity() : v.get<double>();
      }
    // The likelihood draws, when the result has them (an older result has only the covariance).
    for (const auto& [key, into] : {std::pair<const char*, std::vector<Eigen::VectorXd>*>{"draws", &r.draws},
                                    {"ridge", &r.ridge}}) {
      if (!block->contains(key)) continue;
      const std::string field = std::string("fit.log_space.") + key;
      for (const auto& d : (*block)[key]) {
        const auto v = d.get<std::vector<double>>();
        if (Eigen::Index(v.size()) != p) throw io::InputError(file, 0, field, "vector size mismatch");
        for (double x : v)
          if (!std::isfinite(x)) throw io::InputError(file, 0, field, "a number is not finite");
        into->push_back(Eigen::Map<const Eigen::VectorXd>(v.data(), p));
      }
    }
  } catch (const nlohmann::json::exception& e) {
    throw io::InputError(file, 0, "fit.log_space", std::string("malformed: ") + e.what());
  }
  r = material_only(r);
  for (std::size_t i = 0; i < r.names.size(); ++i) {
    try {
      r.material = with_parameter(r.material, r.names[i], std::exp(r.estimate[Eigen::Index(i)]));
    } catch (const std::invalid_argument& e) {
      throw io::InputError(file, 0, "fit.log_space.parameters", e.what());
    }
  }
  return r;
}

}  // namespace spreadfit
