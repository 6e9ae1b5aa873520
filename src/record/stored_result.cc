#include "record/stored_result.h"

#include <limits>
#include <string>
#include <vector>

#include "core/annualize.h"
#include "core/dates.h"
#include "core/regression.h"
#include "record/stored_text.h"

namespace alphatrail::record {

namespace {

using Json = nlohmann::ordered_json;
constexpr std::int64_t kMax = std::numeric_limits<int>::max();

std::vector<std::string> frequency_names() {
  std::vector<std::string> out;
  for (auto f : {core::Frequency::daily, core::Frequency::weekly, core::Frequency::monthly,
                 core::Frequency::quarterly})
    out.push_back(core::frequency_name(f));
  return out;
}

std::vector<std::string> error_names() {
  std::vector<std::string> out;
  for (auto k : {core::ErrorKind::classic, core::ErrorKind::hc0, core::ErrorKind::hc1,
                 core::ErrorKind::hc2, core::ErrorKind::hc3, core::ErrorKind::newey_west})
    out.push_back(core::error_kind_name(k));
  return out;
}

std::vector<std::string> annualize_names() {
  return {core::annualize_name(core::Annualize::compound),
          core::annualize_name(core::Annualize::arithmetic)};
}

// Checks the members of an object: each key with what it must hold.
class Fields {
 public:
  Fields(const StoredJson& s, const Json& parent, std::string path)
      : s_(s), object_(s.object(parent, path)), path_(std::move(path)) {}
  const Json& get(const std::string& key) const { return s_.member(object_, path_, key); }
  std::string at(const std::string& key) const { return path_of(path_, key); }
  void text(const std::string& key) const { s_.text(get(key), at(key)); }
  void count(const std::string& key, std::int64_t low = 0) const {
    s_.whole(get(key), at(key), low, kMax);
  }
  void number(const std::string& key) const { s_.number(get(key), at(key)); }
  void figure(const std::string& key) const { s_.number_or_null(get(key), at(key)); }
  void figures(std::initializer_list<const char*> keys) const {
    for (const char* k : keys) figure(k);
  }
  void flag(const std::string& key) const { s_.flag(get(key), at(key)); }
  void texts(const std::string& key) const { s_.texts(get(key), at(key)); }
  void one_of(const std::string& key, const std::vector<std::string>& names) const {
    s_.one_of(get(key), at(key), names);
  }
  // Calls each(element, its path) for each element of the array at key.
  template <typename F>
  void each(const std::string& key, F each) const {
    const auto& a = s_.array(get(key), at(key));
    for (std::size_t i = 0; i < a.size(); ++i) each(a[i], element_of(at(key), i));
  }

 private:
  const StoredJson& s_;
  const Json& object_;
  std::string path_;
};

void check_sample(const StoredJson& s, const Json& root) {
  const Fields f(s, s.member(root, "", "sample"), "sample");
  f.text("first");
  f.text("last");
  f.count("observations");
  f.one_of("frequency", frequency_names());
  f.count("periods_per_year", 1);
  f.count("dropped");
  const auto& reasons = s.object(f.get("dropped_by_reason"), f.at("dropped_by_reason"));
  for (const auto& [reason, n] : reasons.items())
    s.whole(n, path_of(f.at("dropped_by_reason"), reason), 0, kMax);
  f.each("dropped_periods", [&](const Json& p, const std::string& path) {
    const Fields d(s, p, path);
    d.text("period");
    d.text("reason");
  });
  f.texts("gaps");
}

void check_statistics(const StoredJson& s, const Json& root) {
  const Fields f(s, s.member(root, "", "statistics"), "statistics");
  f.figures({"r_squared", "adj_r_squared", "residual_std", "f_stat", "f_p_value"});
  f.count("observations");
  f.count("coefficients");
  f.count("degrees_of_freedom");
  f.one_of("errors", error_names());
  f.count("lags");
  f.flag("small_sample_factor");
  f.number("confidence");
  f.figures({"condition_number", "alpha_annualized", "appraisal_ratio", "sharpe_strategy",
             "sharpe_benchmark", "treynor_ratio", "tracking_error", "information_ratio",
             "correlation", "mean_excess_strategy", "mean_excess_benchmark", "up_market_beta",
             "down_market_beta"});
  f.count("up_periods");
  f.count("down_periods");
}

void check_rolling(const StoredJson& s, const Json& root) {
  const Json* rolling = s.optional_member(root, "rolling");
  if (!rolling || rolling->is_null()) return;  // none asked for, or recorded before 0.2.0
  const Fields f(s, *rolling, "rolling");
  f.count("window", 1);
  f.one_of("errors", error_names());
  f.one_of("lag_rule", {"auto", "fixed"});
  f.number("confidence");
  f.one_of("annualize", annualize_names());
  f.each("windows", [&](const Json& w, const std::string& path) {
    const Fields d(s, w, path);
    d.text("end");
    d.text("first");
    d.count("observations");
    d.count("lags");
    d.figures({"alpha", "alpha_std_error", "alpha_ci_low", "alpha_ci_high", "alpha_annualized",
               "alpha_annualized_ci_low", "alpha_annualized_ci_high", "beta", "beta_std_error",
               "beta_ci_low", "beta_ci_high"});
  });
}

}  // namespace

Json read_result(std::int64_t run_id, std::string_view text) {
  StoredJson s(run_id, "result", text);
  const Json& root = s.root();
  check_sample(s, root);
  const auto& coefficients = s.array(s.member(root, "", "coefficients"), "coefficients");
  if (coefficients.size() < 2) s.fail("coefficients", "holds fewer than alpha and beta");
  for (std::size_t i = 0; i < coefficients.size(); ++i) {
    const Fields c(s, coefficients[i], element_of("coefficients", i));
    c.text("term");
    c.figures({"estimate", "std_error", "t_stat", "p_value", "ci_low", "ci_high"});
  }
  check_statistics(s, root);
  for (const char* key : {"reading", "preparation", "warnings"})
    s.texts(s.member(root, "", key), key);
  check_rolling(s, root);
  return s.take();
}

}  // namespace alphatrail::record
