#include "record/run_record.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "core/model.h"
#include "core/sha256.h"
#include "version.h"

namespace alphatrail::record {

namespace {

using ordered_json = nlohmann::ordered_json;

// Text of a double that survives a round trip through SQLite: NaN is stored as NULL.
std::string canonical_double(double v) {
  if (std::isnan(v)) return "null";
  return fmt::format("{}", v);
}

template <typename T>
std::string canonical_optional(const std::optional<T>& v) {
  if (!v) return "null";
  return fmt::format("{}", *v);
}

std::optional<std::string> non_empty(const std::string& s) {
  if (s.empty()) return std::nullopt;
  return s;
}

}  // namespace

std::string inputs_hash(const std::string& engine_version, const std::string& parameters_json,
                        const std::vector<RunInput>& inputs) {
  core::Sha256 h;
  h.update("alphatrail inputs v1\nengine: ");
  h.update(engine_version);
  h.update("\nparameters: ");
  h.update(parameters_json);
  h.update("\n");
  for (const auto& in : inputs)
    h.update(fmt::format("input: {} {} {} {} {} {}\n", in.role, in.position, in.series, in.version,
                         in.content_hash, fmt::join(in.columns, ",")));
  return h.hex();
}

namespace {

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

// The rolling estimates of a run: null when none were asked for (see schema/ledger.sql,
// view run_windows).
void write_rolling(JsonText& j, const core::EvaluationResult& r) {
  j.key("rolling");
  if (r.rolling_window <= 0) return j.value(nullptr);
  j.begin_object();
  j.field("window", r.rolling_window);
  j.field("errors", core::error_kind_name(r.fit.errors));
  j.field("lag_rule", r.rolling_auto_lags ? "auto" : "fixed");
  j.field("confidence", r.fit.confidence);
  j.field("annualize", core::annualize_name(r.annualize));
  j.key("windows");
  j.begin_array();
  for (const auto& w : r.rolling) {
    j.begin_object();
    j.field("end", w.end);
    j.field("first", w.first);
    j.field("observations", w.observations);
    j.field("lags", w.lags);
    j.number_field("alpha", w.alpha);
    j.number_field("alpha_std_error", w.alpha_std_error);
    j.number_field("alpha_ci_low", w.alpha_ci_low);
    j.number_field("alpha_ci_high", w.alpha_ci_high);
    j.number_field("alpha_annualized", w.alpha_annualized);
    j.number_field("alpha_annualized_ci_low", w.alpha_annualized_ci_low);
    j.number_field("alpha_annualized_ci_high", w.alpha_annualized_ci_high);
    j.number_field("beta", w.beta);
    j.number_field("beta_std_error", w.beta_std_error);
    j.number_field("beta_ci_low", w.beta_ci_low);
    j.number_field("beta_ci_high", w.beta_ci_high);
    j.end_object();
  }
  j.end_array();
  j.end_object();
}

}  // namespace

std::string result_json_text(const core::EvaluationResult& r,
                             const std::vector<std::string>& reading) {
  const auto& fit = r.fit;
  const auto& d = r.derived;
  JsonText j;
  j.begin_object();
  j.key("sample");
  j.begin_object();
  j.field("first", r.sample.first);
  j.field("last", r.sample.last);
  j.field("observations", r.sample.observations);
  j.field("frequency", core::frequency_name(r.sample.frequency));
  j.field("periods_per_year", d.periods_per_year);
  j.field("dropped", r.sample.dropped.size());
  j.key("dropped_by_reason");
  j.begin_object();
  for (const auto& [reason, count] : r.sample.dropped_by_reason) {
    j.data_key(reason);
    j.value(count);
  }
  j.end_object();
  j.key("dropped_periods");
  j.begin_array();
  for (const auto& p : r.sample.dropped) {
    j.begin_object();
    j.field("period", p.label);
    j.field("reason", p.reason);
    j.end_object();
  }
  j.end_array();
  j.strings("gaps", r.sample.gaps);
  j.end_object();

  j.key("coefficients");
  j.begin_array();
  for (const auto& c : fit.coefficients) {
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

  j.key("statistics");
  j.begin_object();
  j.number_field("r_squared", fit.r_squared);
  j.number_field("adj_r_squared", fit.adj_r_squared);
  j.number_field("residual_std", fit.residual_std);
  j.number_field("f_stat", fit.f_stat);
  j.number_field("f_p_value", fit.f_p_value);
  j.field("observations", fit.n);
  j.field("coefficients", fit.k);
  j.field("degrees_of_freedom", fit.df);
  j.field("errors", core::error_kind_name(fit.errors));
  j.field("lags", fit.lags);
  j.field("small_sample_factor", fit.small_sample_applied);
  j.field("confidence", fit.confidence);
  j.number_field("condition_number", fit.condition_number);
  j.number_field("alpha_annualized", d.alpha_annualized);
  j.number_field("appraisal_ratio", d.appraisal_ratio);
  j.number_field("sharpe_strategy", d.sharpe_strategy);
  j.number_field("sharpe_benchmark", d.sharpe_benchmark);
  j.number_field("treynor_ratio", d.treynor_ratio);
  j.number_field("tracking_error", d.tracking_error);
  j.number_field("information_ratio", d.information_ratio);
  j.number_field("correlation", d.correlation);
  j.number_field("mean_excess_strategy", d.mean_excess_strategy);
  j.number_field("mean_excess_benchmark", d.mean_excess_benchmark);
  j.number_field("up_market_beta", d.up_market_beta);
  j.number_field("down_market_beta", d.down_market_beta);
  j.field("up_periods", d.up_periods);
  j.field("down_periods", d.down_periods);
  j.end_object();

  j.strings("reading", reading);
  j.strings("preparation", r.sample.preparation);
  j.strings("warnings", r.sample.warnings);
  write_rolling(j, r);
  j.end_object();
  return j.take();
}

ordered_json result_json(const core::EvaluationResult& r, const std::vector<std::string>& reading) {
  return ordered_json::parse(result_json_text(r, reading));
}

// The canonical record of a row in two parts, the text before and after the previous run's
// record hash, so that a batch builds them in parallel and only chains them in order.
std::pair<std::string, std::string> canonical_record_parts(const RunRow& r) {
  std::string before = fmt::format(
      "alphatrail run v1\nrun_id: {}\ncreated_at: {}\nengine_version: {}\nstrategy: {}\n"
      "benchmark: {}\nrate: {}\nfactors: {}\nstudy: {}\nnote: {}\nrevises_run_id: {}\n"
      "parameters: {}\ninputs_hash: {}\nsample: {} {} {} {} {}\nerrors: {} {}\n"
      "headline: {} {} {} {} {} {} {} {}\nresult: {}\nprevious: ",
      r.run_id, r.created_at, r.engine_version, r.strategy, r.benchmark, r.rate,
      canonical_optional(r.factors), canonical_optional(r.study), canonical_optional(r.note),
      canonical_optional(r.revises_run_id), r.parameters_json, r.inputs_hash, r.frequency,
      r.first_period, r.last_period, r.observations, r.dropped_periods, r.errors, r.lags,
      canonical_double(r.alpha), canonical_double(r.alpha_std_error), canonical_double(r.alpha_t),
      canonical_double(r.alpha_p), canonical_double(r.alpha_annualized), canonical_double(r.beta),
      canonical_double(r.beta_t), canonical_double(r.r_squared), r.result_json);
  std::string after = "\n";
  for (const auto& in : r.inputs)
    after += fmt::format("input: {} {} {} {}\n", in.role, in.position, in.version_id, in.columns);
  for (const auto& c : r.coefficients)
    after += fmt::format("coefficient: {} {} {} {} {} {} {}\n", c.term,
                         canonical_double(c.estimate), canonical_double(c.std_error),
                         canonical_double(c.t_stat), canonical_double(c.p_value),
                         canonical_double(c.ci_low), canonical_double(c.ci_high));
  return {std::move(before), std::move(after)};
}

// A run's row with every field but the two hashes; pure, so a batch drafts on all cores.
RunRow draft_row(const NewRun& run, std::int64_t run_id, const std::string& created_at) {
  const core::EvaluationResult& r = *run.result;
  const auto& alpha = core::coefficient(r.fit, r.model, core::TermRole::intercept);
  const auto& beta = core::coefficient(r.fit, r.model, core::TermRole::market);
  RunRow row;
  row.run_id = run_id;
  row.created_at = created_at;
  row.engine_version = kEngineVersion;
  row.strategy = run.strategy;
  row.benchmark = run.benchmark;
  row.rate = run.rate;
  row.factors = non_empty(run.factors);
  row.study = non_empty(run.study);
  row.note = non_empty(run.note);
  row.revises_run_id = run.revises_run_id;
  row.parameters_json = run.parameters_json;
  row.inputs_hash = inputs_hash(kEngineVersion, row.parameters_json, run.inputs);
  row.frequency = core::frequency_name(r.sample.frequency);
  row.first_period = r.sample.first;
  row.last_period = r.sample.last;
  row.observations = r.sample.observations;
  row.dropped_periods = static_cast<int>(r.sample.dropped.size());
  row.errors = core::error_kind_name(r.fit.errors);
  row.lags = r.fit.lags;
  row.alpha = alpha.estimate;
  row.alpha_std_error = alpha.std_error;
  row.alpha_t = alpha.t_stat;
  row.alpha_p = alpha.p_value;
  row.alpha_annualized = r.derived.alpha_annualized;
  row.beta = beta.estimate;
  row.beta_t = beta.t_stat;
  row.r_squared = r.fit.r_squared;
  row.result_json = result_json_text(r, run.reading);
  for (const auto& in : run.inputs)
    row.inputs.push_back(
        {in.role, in.position, in.version_id, fmt::format("{}", fmt::join(in.columns, ","))});
  row.coefficients = r.fit.coefficients;
  return row;
}

std::string canonical_run_record(const RunRow& r) {
  const auto [before, after] = canonical_record_parts(r);
  return before + r.previous_record_hash + after;
}

std::string chain_hash(const std::string& previous_record_hash, const std::string& record) {
  return core::sha256_hex(previous_record_hash + "\n" + record);
}

}  // namespace alphatrail::record
