#include "src/history/history_db.hpp"
#include "src/fit/parameter_names.hpp"

#include <fmt/format.h>

#include <chrono>
#include <cmath>
#include <cstdlib>
#include <ctime>
#include <map>
#include <stdexcept>

#include "src/history/file_hash.hpp"
#include "src/history/history_location.hpp"
#include "src/history/postgres_history.hpp"
#include "src/history/sqlite_history.hpp"
#include "src/io/input_error.hpp"
#include "src/report/result_json.hpp"
#include "src/version.hpp"

namespace spreadfit::history {

namespace {

void check_storable(const StoredResult& r) {
  if (r.input_hash.empty()) throw std::invalid_argument("history record: input_hash is empty");
  if (r.sample_id.empty()) throw std::invalid_argument("history record: sample_id is empty");
  if (r.verdict != "pass" && r.verdict != "fail" && r.verdict != "none")
    throw std::invalid_argument("history record: verdict '" + r.verdict + "' (expected pass, fail or none)");
}

bool same_number(double a, double b) { return (std::isnan(a) && std::isnan(b)) || a == b; }

/// A store that checks every result before the backend sees it.
class CheckedStore final : public HistoryStore {
 public:
  explicit CheckedStore(std::unique_ptr<HistoryStore> inner) : inner_(std::move(inner)) {}
  WriteOutcome record(const StoredResult& r) override {
    check_storable(r);
    return inner_->record(r);
  }
  std::vector<StoredResult> load(const HistoryFilter& f) override { return inner_->load(f); }
  std::vector<std::string> products() override { return inner_->products(); }
  std::vector<std::string> sites() override { return inner_->sites(); }
  const std::string& name() const override { return inner_->name(); }

 private:
  std::unique_ptr<HistoryStore> inner_;
};

}  // namespace

bool same_result(const StoredResult& a, const StoredResult& b) {
  if (a.sample_id != b.sample_id || a.product != b.product || a.site != b.site || a.tested != b.tested ||
      a.rig != b.rig || a.law != b.law || a.verdict != b.verdict || a.input_hash != b.input_hash ||
      a.software_version != b.software_version || a.recorded_at != b.recorded_at || a.result_json != b.result_json ||
      a.parameters.size() != b.parameters.size())
    return false;
  for (std::size_t k = 0; k < a.parameters.size(); ++k) {
    const auto& [an, av, al, ah, au] = a.parameters[k];
    const auto& [bn, bv, bl, bh, bu] = b.parameters[k];
    if (an != bn || au != bu || !same_number(av, bv) || !same_number(al, bl) || !same_number(ah, bh)) return false;
  }
  return true;
}

std::unique_ptr<HistoryStore> open_history(const std::string& location, Access access) {
  if (is_server_uri(location)) return std::make_unique<CheckedStore>(open_postgres_history(location, access));
  return std::make_unique<CheckedStore>(open_sqlite_history(location, access));
}

WriteOutcome record(const std::string& location, const StoredResult& r) {
  check_storable(r);
  return open_history(location, Access::Write)->record(r);
}

std::vector<StoredResult> load(const std::string& location, const HistoryFilter& filter) {
  return open_history(location, Access::Read)->load(filter);
}

std::vector<StoredResult> load(const std::string& location, const std::string& product) {
  return load(location, HistoryFilter{product, ""});
}

std::vector<std::string> products(const std::string& location) {
  return open_history(location, Access::Read)->products();
}

CopySummary copy_history(const std::string& from, const std::string& to, const HistoryFilter& filter,
                         const std::string& site_for_unsited) {
  if (from == to)
    throw io::InputError(display_name(to), 0, "--copy-to", "is the history being copied (expected another one)");
  std::vector<StoredResult> rows = open_history(from, Access::Read)->load(filter);
  const std::unique_ptr<HistoryStore> target = open_history(to, Access::Write);
  std::map<std::string, StoredResult> there;
  for (StoredResult& r : target->load(HistoryFilter{})) {
    std::string hash = r.input_hash;
    there.emplace(std::move(hash), std::move(r));
  }
  CopySummary summary;
  for (StoredResult& r : rows) {
    if (r.site.empty() && !site_for_unsited.empty()) {
      r.site = site_for_unsited;
      ++summary.site_given;
    }
    const auto it = there.find(r.input_hash);
    if (it == there.end()) {
      target->record(r);
      ++summary.added;
    } else if (same_result(it->second, r)) {
      ++summary.unchanged;
    } else if (it->second.recorded_at > r.recorded_at) {  // ISO 8601 UTC text: text order is time order
      ++summary.kept_newer;
    } else {
      target->record(r);
      ++summary.replaced;
    }
  }
  return summary;
}

std::string default_site() {
  const char* value = std::getenv(site_environment_variable);
  if (value == nullptr) return {};
  const std::string site = value;
  if (site.find_first_of("\r\n\t") != std::string::npos)
    throw io::InputError(site_environment_variable, 0, "",
                         "the site code holds a line break or tab (expected a short code such as \"RH\")");
  if (site.find_first_not_of(' ') == std::string::npos) return {};
  return site;
}

std::string utc_now_iso8601() {
  const std::time_t now = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm utc{};
  if (gmtime_r(&now, &utc) == nullptr) throw std::runtime_error("the system clock cannot be read as UTC");
  char text[32];
  const std::size_t n = std::strftime(text, sizeof text, "%Y-%m-%dT%H:%M:%SZ", &utc);
  return std::string(text, n);
}

StoredResult stored_result(const report::FitOutcome& o) {
  if (o.tests.empty()) throw std::invalid_argument("stored_result: the outcome has no tests");
  StoredResult s;
  s.sample_id = o.tests.front().sample_id;
  for (const auto& t : o.tests) {
    if (s.product.empty()) s.product = t.product;
    if (s.site.empty()) s.site = t.site;
    if (s.tested.empty()) s.tested = t.tested;
  }
  if (s.site.empty()) s.site = default_site();
  for (const auto& t : o.tests) {
    if (!s.rig.empty()) s.rig.push_back('+');
    s.rig.append(io::rig_kind_name(t.setup.rig));
  }
  if (const fit::FitResult* r = o.result()) {
    s.law = std::string(law_name(r->law));
    for (const auto& p : r->parameters)
      if (!fit::is_parameter(p.name, fit::Parameter::TimeOrigin)) s.parameters.emplace_back(p.name, p.value, p.lower, p.upper, p.unit);
  }
  s.verdict = std::string(qc::verdict_status_name(o.verdict.status));
  s.input_hash = input_hash(o.tests);
  s.software_version = std::string(software_version());
  s.recorded_at = utc_now_iso8601();
  s.result_json = report::result_json(o).dump();
  return s;
}

}  // namespace spreadfit::history
