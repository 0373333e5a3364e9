#include "src/fit/stored_fit.hpp"

#include <cmath>
#include <fstream>
#include <iterator>
#include <limits>
#include <nlohmann/json.hpp>
#include <stdexcept>
#include <system_error>

#include "src/fit/parameter_names.hpp"
#include "src/fit/prediction_band.hpp"
#include "src/io/input_error.hpp"

namespace spreadfit::fit {

namespace {

using nlohmann::json;

/// A result JSON is a few kB; a file far larger is not one (and would only cost memory).
constexpr std::uintmax_t kMaxBytes = 8u << 20;
/// Deepest nesting read: a result nests 5 levels; deeper input is refused while parsing, before it can exhaust
/// the stack of the recursive copy and destruction of a JSON value.
constexpr int kMaxDepth = 32;

/// nlohmann's message without its internal code: "[json.exception.parse_error.101] parse error at ..." -> "parse
/// error at ...".
std::string plain(const json::exception& e) {
  std::string text = e.what();
  if (!text.empty() && text.front() == '[') {
    const std::size_t close = text.find("] ");
    if (close != std::string::npos) text.erase(0, close + 2);
  }
  return text;
}

class ResultReader {
 public:
  explicit ResultReader(std::string file) : file_(std::move(file)) {}

  [[noreturn]] void fail(const std::string& field, const std::string& message) const {
    throw io::InputError(file_, 0, field, message);
  }

  /// The member `key` of `object`, which must be an object; fails naming `field` when it is missing.
  const json& member(const json& object, const char* key, const std::string& field) const {
    if (!object.is_object()) fail(field, "expected an object");
    const auto it = object.find(key);
    if (it == object.end()) fail(field + "." + key, "missing (expected a result written by spreadfit fit --json)");
    return *it;
  }

  double number(const json& value, const std::string& field) const {
    if (!value.is_number()) fail(field, "expected a number");
    const double v = value.get<double>();
    if (!std::isfinite(v)) fail(field, "not a finite number");
    return v;
  }

  json parse(const std::string& text) const {
    // Counts nesting on the way in; the callback sees every value start with its depth.
    const json::parser_callback_t limit_depth = [this](int depth, json::parse_event_t event, json&) {
      if ((event == json::parse_event_t::object_start || event == json::parse_event_t::array_start) &&
          depth >= kMaxDepth)
        fail("", "nested more than " + std::to_string(kMaxDepth) + " levels deep (expected a spreadfit result JSON)");
      return true;
    };
    try {
      return json::parse(text, limit_depth);
    } catch (const json::exception& e) {
      // Syntax errors and numbers out of range (1e400) alike are bad input in this file.
      fail("", "not a valid result JSON: " + plain(e));
    }
  }

 private:
  std::string file_;
};

}  // namespace

FitResult load_fitted_material(const std::filesystem::path& path) {
  const std::string file = path.string();
  const ResultReader reader(file);
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) reader.fail("", "is a folder (expected a spreadfit result JSON)");
  const std::uintmax_t size = std::filesystem::file_size(path, ec);
  if (!ec && size > kMaxBytes) reader.fail("", "file is larger than 8 MB (expected a spreadfit result JSON)");
  std::ifstream in(path, std::ios::binary);
  if (!in) reader.fail("", "result file not found or unreadable (expected a spreadfit result JSON)");
  const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  json document = reader.parse(text);
  if (document.is_array()) {
    if (document.size() != 1)
      reader.fail("", "holds " + std::to_string(document.size()) +
                          " results (expected one; write each material with --out-dir)");
  } else if (!document.is_object()) {
    reader.fail("", "expected a JSON object (a spreadfit result)");
  }
  const json& j = document.is_array() ? document.front() : document;
  if (!j.is_object()) reader.fail("", "expected a JSON object (a spreadfit result)");

  const auto model = j.find("model");
  if (model == j.end() || !model->is_string())
    reader.fail("model", "no fitted model: the fit failed, so there is no material to predict with");
  const auto law = law_from_name(model->get<std::string>());
  if (!law) reader.fail("model", "unknown model " + io::quote_for_message(model->get<std::string>()));
  const auto fit = j.find("fit");
  if (fit == j.end() || !fit->is_object()) reader.fail("fit", "missing (expected the fit block of a result)");
  const auto block_it = fit->find("log_space");
  if (block_it == fit->end())
    reader.fail("fit.log_space",
                "missing: the result comes from a single final reading (closed form), which gives no parameter "
                "uncertainty to carry to another rig; fit a test with timed readings");
  const json& block = *block_it;

  FitResult r;
  r.law = *law;
  r.status = FitStatus::Converged;
  const json& names = reader.member(block, "parameters", "fit.log_space");
  const json& estimate = reader.member(block, "estimate", "fit.log_space");
  const json& cov = reader.member(block, "covariance", "fit.log_space");
  if (!names.is_array() || names.empty() || names.size() > 16)
    reader.fail("fit.log_space.parameters", "expected an array of 1 to 16 parameter names");
  for (const json& n : names) {
    if (!n.is_string()) reader.fail("fit.log_space.parameters", "expected parameter names (strings)");
    r.names.push_back(n.get<std::string>());
  }
  const Eigen::Index p = Eigen::Index(r.names.size());
  if (!estimate.is_array() || Eigen::Index(estimate.size()) != p)
    reader.fail("fit.log_space.estimate", "expected one number per parameter (" + std::to_string(p) + ")");
  r.estimate.resize(p);
  for (Eigen::Index a = 0; a < p; ++a) r.estimate[a] = reader.number(estimate[std::size_t(a)], "fit.log_space.estimate");
  if (!cov.is_array() || Eigen::Index(cov.size()) != p)
    reader.fail("fit.log_space.covariance", "expected a " + std::to_string(p) + " x " + std::to_string(p) + " matrix");
  r.covariance.resize(p, p);
  for (Eigen::Index a = 0; a < p; ++a) {
    const json& row = cov[std::size_t(a)];
    if (!row.is_array() || Eigen::Index(row.size()) != p)
      reader.fail("fit.log_space.covariance", "expected a " + std::to_string(p) + " x " + std::to_string(p) + " matrix");
    for (Eigen::Index b = 0; b < p; ++b) {
      const json& v = row[std::size_t(b)];
      r.covariance(a, b) =
          v.is_null() ? std::numeric_limits<double>::infinity() : reader.number(v, "fit.log_space.covariance");
    }
  }
  // The likelihood draws and ridge points, when the result has them (an older result has only the covariance).
  for (const auto& [key, into] : {std::pair<const char*, std::vector<Eigen::VectorXd>*>{"draws", &r.draws},
                                  {"ridge", &r.ridge}}) {
    const auto found = block.find(key);
    if (found == block.end()) continue;
    const std::string field = std::string("fit.log_space.") + key;
    if (!found->is_array() || found->size() > 10000) reader.fail(field, "expected an array of parameter vectors");
    for (const json& d : *found) {
      if (!d.is_array() || Eigen::Index(d.size()) != p)
        reader.fail(field, "expected vectors of one number per parameter (" + std::to_string(p) + ")");
      Eigen::VectorXd v(p);
      for (Eigen::Index a = 0; a < p; ++a) v[a] = reader.number(d[std::size_t(a)], field);
      into->push_back(v);
    }
  }
  r = material_only(r);
  for (std::size_t i = 0; i < r.names.size(); ++i) {
    const double log_value = r.estimate[Eigen::Index(i)];
    // exp(log_value) must be a finite, positive number: |log| above 700 overflows a double (exp(709.8) is the
    // largest, IEEE 754 binary64).
    if (!(std::abs(log_value) < 700.0))
      reader.fail("fit.log_space.estimate", "parameter " + io::quote_for_message(r.names[i]) + " is out of range");
    try {
      r.material = with_parameter(r.material, r.names[i], std::exp(log_value));
    } catch (const std::invalid_argument& e) {
      reader.fail("fit.log_space.parameters", e.what());
    }
  }
  return r;
}

}  // namespace spreadfit::fit
