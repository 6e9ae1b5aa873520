#include "record/stored_result.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "record/stored_text.h"

namespace alphatrail::record {

namespace {

using Json = nlohmann::ordered_json;
constexpr std::int64_t kMax = std::numeric_limits<int>::max();

constexpr core::Frequency kFrequencies[] = {core::Frequency::daily, core::Frequency::weekly,
                                            core::Frequency::monthly, core::Frequency::quarterly};
constexpr core::ErrorKind kErrorKinds[] = {core::ErrorKind::classic, core::ErrorKind::hc0,
                                           core::ErrorKind::hc1,     core::ErrorKind::hc2,
                                           core::ErrorKind::hc3,     core::ErrorKind::newey_west};
constexpr core::Annualize kAnnualizes[] = {core::Annualize::compound, core::Annualize::arithmetic};
constexpr const char* kAutoLags = "auto";
constexpr const char* kFixedLags = "fixed";

template <typename E, std::size_t N>
std::vector<std::string> names_of(const E (&values)[N], const char* (*name)(E)) {
  std::vector<std::string> out;
  for (E v : values) out.push_back(name(v));
  return out;
}

// Writes JSON text in the compact form nlohmann-json dumps (the form result_json has always
// been stored in) without building a document first: keys and punctuation are written here,
// every value and every key that is not a plain literal by nlohmann-json itself, so numbers
// and strings are formatted exactly as a dump formats them. A run's result is written for
// every run of a batch; building and dumping a document was most of the cost of recording.
class JsonText {
 public:
  void begin_object() { open('{'); }
  void end_object() { close('}'); }
  void begin_array() { open('['); }
  void end_array() { close(']'); }
  // Writes a key that is a plain literal: no quote, backslash or control character.
  void key(std::string_view literal) {
    separate();
    out_ += '"';
    out_ += literal;
    out_ += "\":";
    after_key_ = true;
  }
  // Writes a key from data, escaped as a string value is.
  void data_key(std::string_view text) {
    value(text);
    out_ += ':';
    after_key_ = true;
  }
  template <typename T>
  void value(const T& v) {
    separate();
    out_ += nlohmann::ordered_json(v).dump();
  }
  // Strings of printable ASCII without quotes or backslashes (nearly all: the sentences of a
  // reading) go out as they are, which is what a dump writes for them, without the dump's
  // UTF-8 decoding, a tenth of its time; the others take the dump's escaping.
  void value(std::string_view text) {
    separate();
    const bool plain = std::all_of(text.begin(), text.end(), [](char c) {
      const auto u = static_cast<unsigned char>(c);
      return u >= 0x20 && u < 0x80 && c != '"' && c != '\\';
    });
    if (!plain) {
      out_ += nlohmann::ordered_json(std::string(text)).dump();
      return;
    }
    out_ += '"';
    out_ += text;
    out_ += '"';
  }
  void value(const std::string& text) { value(std::string_view(text)); }
  void value(const char* text) { value(std::string_view(text)); }
  // A finite number as itself, NaN and infinities as null.
  void number(double v) {
    if (std::isfinite(v))
      value(v);
    else
      value(nullptr);
  }
  template <typename T>
  void field(std::string_view literal, const T& v) {
    key(literal);
    value(v);
  }
  void number_field(std::string_view literal, double v) {
    key(literal);
    number(v);
  }
  void strings(std::string_view literal, const std::vector<std::string>& texts) {
    key(literal);
    begin_array();
    for (const auto& t : texts) value(t);
    end_array();
  }
  std::string take() { return std::move(out_); }

 private:
  void separate() {
    if (after_key_) {
      after_key_ = false;
    } else if (!first_.empty()) {
      if (!first_.back()) out_ += ',';
      first_.back() = false;
    }
  }
  void open(char c) {
    separate();
    out_ += c;
    first_.push_back(true);
  }
  void close(char c) {
    out_ += c;
    first_.pop_back();
  }

  std::string out_;
  std::vector<bool> first_;  // per open object or array: nothing written in it yet
  bool after_key_ = false;
};

// Reads the members of an object: each key as what it must hold.
class Fields {
 public:
  Fields(const StoredJson& s, const Json& parent, std::string path)
      : s_(s), object_(s.object(parent, path)), path_(std::move(path)) {}
  const Json& get(const std::string& key) const { return s_.member(object_, path_, key); }
  std::string at(const std::string& key) const { return path_of(path_, key); }
  std::string text(const std::string& key) const { return s_.text(get(key), at(key)); }
  int count(const std::string& key, std::int64_t low = 0) const {
    return static_cast<int>(s_.whole(get(key), at(key), low, kMax));
  }
  double number(const std::string& key) const { return s_.number(get(key), at(key)); }
  // A figure: a number, or null for one that could not be computed (NaN).
  double figure(const std::string& key) const {
    const Json& v = get(key);
    s_.number_or_null(v, at(key));
    return v.is_null() ? std::numeric_limits<double>::quiet_NaN() : v.get<double>();
  }
  bool flag(const std::string& key) const { return s_.flag(get(key), at(key)); }
  std::vector<std::string> texts(const std::string& key) const {
    return s_.texts(get(key), at(key));
  }
  template <typename E, std::size_t N>
  E one_of(const std::string& key, const E (&values)[N], const char* (*name)(E)) const {
    return values[s_.one_of(get(key), at(key), names_of(values, name))];
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

StoredSample read_sample(const StoredJson& s, const Json& root) {
  const Fields f(s, s.member(root, "", "sample"), "sample");
  StoredSample out;
  out.first = f.text("first");
  out.last = f.text("last");
  out.observations = f.count("observations");
  out.frequency = f.one_of("frequency", kFrequencies, core::frequency_name);
  out.periods_per_year = f.count("periods_per_year", 1);
  out.dropped = f.count("dropped");
  const auto& reasons = s.object(f.get("dropped_by_reason"), f.at("dropped_by_reason"));
  for (const auto& [reason, n] : reasons.items())
    out.dropped_by_reason.emplace_back(
        reason, s.whole(n, path_of(f.at("dropped_by_reason"), reason), 0, kMax));
  f.each("dropped_periods", [&](const Json& p, const std::string& path) {
    const Fields d(s, p, path);
    StoredDroppedPeriod dropped;
    dropped.period = d.text("period");
    dropped.reason = d.text("reason");
    out.dropped_periods.push_back(std::move(dropped));
  });
  out.gaps = f.texts("gaps");
  return out;
}

std::vector<core::Coefficient> read_coefficients(const StoredJson& s, const Json& root) {
  const auto& coefficients = s.array(s.member(root, "", "coefficients"), "coefficients");
  if (coefficients.size() < 2) s.fail("coefficients", "holds fewer than alpha and beta");
  std::vector<core::Coefficient> out;
  for (std::size_t i = 0; i < coefficients.size(); ++i) {
    const Fields c(s, coefficients[i], element_of("coefficients", i));
    core::Coefficient coefficient;
    coefficient.term = c.text("term");
    coefficient.estimate = c.figure("estimate");
    coefficient.std_error = c.figure("std_error");
    coefficient.t_stat = c.figure("t_stat");
    coefficient.p_value = c.figure("p_value");
    coefficient.ci_low = c.figure("ci_low");
    coefficient.ci_high = c.figure("ci_high");
    out.push_back(std::move(coefficient));
  }
  return out;
}

StoredStatistics read_statistics(const StoredJson& s, const Json& root) {
  const Fields f(s, s.member(root, "", "statistics"), "statistics");
  StoredStatistics out;
  out.r_squared = f.figure("r_squared");
  out.adj_r_squared = f.figure("adj_r_squared");
  out.residual_std = f.figure("residual_std");
  out.f_stat = f.figure("f_stat");
  out.f_p_value = f.figure("f_p_value");
  out.observations = f.count("observations");
  out.coefficients = f.count("coefficients");
  out.degrees_of_freedom = f.count("degrees_of_freedom");
  out.errors = f.one_of("errors", kErrorKinds, core::error_kind_name);
  out.lags = f.count("lags");
  out.small_sample_factor = f.flag("small_sample_factor");
  out.confidence = f.number("confidence");
  out.condition_number = f.figure("condition_number");
  out.alpha_annualized = f.figure("alpha_annualized");
  out.appraisal_ratio = f.figure("appraisal_ratio");
  out.sharpe_strategy = f.figure("sharpe_strategy");
  out.sharpe_benchmark = f.figure("sharpe_benchmark");
  out.treynor_ratio = f.figure("treynor_ratio");
  out.tracking_error = f.figure("tracking_error");
  out.information_ratio = f.figure("information_ratio");
  out.correlation = f.figure("correlation");
  out.mean_excess_strategy = f.figure("mean_excess_strategy");
  out.mean_excess_benchmark = f.figure("mean_excess_benchmark");
  out.up_market_beta = f.figure("up_market_beta");
  out.down_market_beta = f.figure("down_market_beta");
  out.up_periods = f.count("up_periods");
  out.down_periods = f.count("down_periods");
  return out;
}

const char* lag_rule_name(bool auto_lags) {
  return auto_lags ? kAutoLags : kFixedLags;
}

void read_rolling(const StoredJson& s, const Json& root, RunResult& out) {
  const Json* rolling = s.optional_member(root, "rolling");
  out.rolling_recorded = rolling != nullptr;   // absent: recorded before 0.2.0
  if (!rolling || rolling->is_null()) return;  // none asked for
  const Fields f(s, *rolling, "rolling");
  StoredRolling r;
  r.window = f.count("window", 1);
  r.errors = f.one_of("errors", kErrorKinds, core::error_kind_name);
  r.auto_lags = s.one_of(f.get("lag_rule"), f.at("lag_rule"), {kAutoLags, kFixedLags}) == 0;
  r.confidence = f.number("confidence");
  r.annualize = f.one_of("annualize", kAnnualizes, core::annualize_name);
  f.each("windows", [&](const Json& w, const std::string& path) {
    const Fields d(s, w, path);
    core::RollingWindow window;
    window.end = d.text("end");
    window.first = d.text("first");
    window.observations = d.count("observations");
    window.lags = d.count("lags");
    for (const auto& figure : core::kWindowFigures) window.*figure.member = d.figure(figure.name);
    r.windows.push_back(std::move(window));
  });
  out.rolling = std::move(r);
}

void write_rolling(JsonText& j, const RunResult& result) {
  if (!result.rolling_recorded) return;
  j.key("rolling");
  if (!result.rolling) return j.value(nullptr);
  const StoredRolling& r = *result.rolling;
  j.begin_object();
  j.field("window", r.window);
  j.field("errors", core::error_kind_name(r.errors));
  j.field("lag_rule", lag_rule_name(r.auto_lags));
  j.field("confidence", r.confidence);
  j.field("annualize", core::annualize_name(r.annualize));
  j.key("windows");
  j.begin_array();
  for (const auto& w : r.windows) {
    j.begin_object();
    j.field("end", w.end);
    j.field("first", w.first);
    j.field("observations", w.observations);
    j.field("lags", w.lags);
    for (const auto& figure : core::kWindowFigures) j.number_field(figure.name, w.*figure.member);
    j.end_object();
  }
  j.end_array();
  j.end_object();
}

}  // namespace

RunResult run_result(const core::EvaluationResult& r, const std::vector<std::string>& reading) {
  const auto& fit = r.fit;
  const auto& d = r.derived;
  RunResult out;
  auto& sample = out.sample;
  sample.first = r.sample.first;
  sample.last = r.sample.last;
  sample.observations = r.sample.observations;
  sample.frequency = r.sample.frequency;
  sample.periods_per_year = d.periods_per_year;
  sample.dropped = static_cast<int>(r.sample.dropped.size());
  for (const auto& [reason, count] : r.sample.dropped_by_reason)
    sample.dropped_by_reason.emplace_back(reason, static_cast<std::int64_t>(count));
  for (const auto& p : r.sample.dropped) sample.dropped_periods.push_back({p.label, p.reason});
  sample.gaps = r.sample.gaps;

  out.coefficients = fit.coefficients;

  auto& s = out.statistics;
  s.r_squared = fit.r_squared;
  s.adj_r_squared = fit.adj_r_squared;
  s.residual_std = fit.residual_std;
  s.f_stat = fit.f_stat;
  s.f_p_value = fit.f_p_value;
  s.observations = fit.n;
  s.coefficients = fit.k;
  s.degrees_of_freedom = fit.df;
  s.errors = fit.errors;
  s.lags = fit.lags;
  s.small_sample_factor = fit.small_sample_applied;
  s.confidence = fit.confidence;
  s.condition_number = fit.condition_number;
  s.alpha_annualized = d.alpha_annualized;
  s.appraisal_ratio = d.appraisal_ratio;
  s.sharpe_strategy = d.sharpe_strategy;
  s.sharpe_benchmark = d.sharpe_benchmark;
  s.treynor_ratio = d.treynor_ratio;
  s.tracking_error = d.tracking_error;
  s.information_ratio = d.information_ratio;
  s.correlation = d.correlation;
  s.mean_excess_strategy = d.mean_excess_strategy;
  s.mean_excess_benchmark = d.mean_excess_benchmark;
  s.up_market_beta = d.up_market_beta;
  s.down_market_beta = d.down_market_beta;
  s.up_periods = d.up_periods;
  s.down_periods = d.down_periods;

  out.reading = reading;
  out.preparation = r.sample.preparation;
  out.warnings = r.sample.warnings;
  if (r.rolling_window > 0)
    out.rolling = StoredRolling{r.rolling_window, fit.errors,  r.rolling_auto_lags,
                                fit.confidence,   r.annualize, r.rolling};
  return out;
}

std::string result_text(const RunResult& result) {
  const auto& sample = result.sample;
  JsonText j;
  j.begin_object();
  j.key("sample");
  j.begin_object();
  j.field("first", sample.first);
  j.field("last", sample.last);
  j.field("observations", sample.observations);
  j.field("frequency", core::frequency_name(sample.frequency));
  j.field("periods_per_year", sample.periods_per_year);
  j.field("dropped", sample.dropped);
  j.key("dropped_by_reason");
  j.begin_object();
  for (const auto& [reason, count] : sample.dropped_by_reason) {
    j.data_key(reason);
    j.value(count);
  }
  j.end_object();
  j.key("dropped_periods");
  j.begin_array();
  for (const auto& p : sample.dropped_periods) {
    j.begin_object();
    j.field("period", p.period);
    j.field("reason", p.reason);
    j.end_object();
  }
  j.end_array();
  j.strings("gaps", sample.gaps);
  j.end_object();

  j.key("coefficients");
  j.begin_array();
  for (const auto& c : result.coefficients) {
    j.begin_object();
    j.field("term", c.term);
    j.number_field("estimate", c.estimate);
    j.number_field("std_error", c.std_error);
    j.number_field("t_stat", c.t_stat);
    j.number_field("p_value", c.p_value);
    j.number_field("ci_low", c.ci_low);
    j.number_field("ci_high", c.ci_high);
    j.end_object();
  }
  j.end_array();

  const auto& s = result.statistics;
  j.key("statistics");
  j.begin_object();
  j.number_field("r_squared", s.r_squared);
  j.number_field("adj_r_squared", s.adj_r_squared);
  j.number_field("residual_std", s.residual_std);
  j.number_field("f_stat", s.f_stat);
  j.number_field("f_p_value", s.f_p_value);
  j.field("observations", s.observations);
  j.field("coefficients", s.coefficients);
  j.field("degrees_of_freedom", s.degrees_of_freedom);
  j.field("errors", core::error_kind_name(s.errors));
  j.field("lags", s.lags);
  j.field("small_sample_factor", s.small_sample_factor);
  j.field("confidence", s.confidence);
  j.number_field("condition_number", s.condition_number);
  j.number_field("alpha_annualized", s.alpha_annualized);
  j.number_field("appraisal_ratio", s.appraisal_ratio);
  j.number_field("sharpe_strategy", s.sharpe_strategy);
  j.number_field("sharpe_benchmark", s.sharpe_benchmark);
  j.number_field("treynor_ratio", s.treynor_ratio);
  j.number_field("tracking_error", s.tracking_error);
  j.number_field("information_ratio", s.information_ratio);
  j.number_field("correlation", s.correlation);
  j.number_field("mean_excess_strategy", s.mean_excess_strategy);
  j.number_field("mean_excess_benchmark", s.mean_excess_benchmark);
  j.number_field("up_market_beta", s.up_market_beta);
  j.number_field("down_market_beta", s.down_market_beta);
  j.field("up_periods", s.up_periods);
  j.field("down_periods", s.down_periods);
  j.end_object();

  j.strings("reading", result.reading);
  j.strings("preparation", result.preparation);
  j.strings("warnings", result.warnings);
  write_rolling(j, result);
  j.end_object();
  return j.take();
}

RunResult read_run_result(std::int64_t run_id, std::string_view text, Json* document) {
  StoredJson s(run_id, "result", text);
  const Json& root = s.root();
  RunResult out;
  out.sample = read_sample(s, root);
  out.coefficients = read_coefficients(s, root);
  out.statistics = read_statistics(s, root);
  out.reading = s.texts(s.member(root, "", "reading"), "reading");
  out.preparation = s.texts(s.member(root, "", "preparation"), "preparation");
  out.warnings = s.texts(s.member(root, "", "warnings"), "warnings");
  read_rolling(s, root, out);
  if (document) *document = s.take();
  return out;
}

Json read_result(std::int64_t run_id, std::string_view text) {
  Json document;
  read_run_result(run_id, text, &document);
  return document;
}

const core::Coefficient* find_coefficient(const RunResult& result, std::string_view term) {
  const auto it = std::find_if(result.coefficients.begin(), result.coefficients.end(),
                               [&](const core::Coefficient& c) { return c.term == term; });
  return it == result.coefficients.end() ? nullptr : &*it;
}

}  // namespace alphatrail::record
