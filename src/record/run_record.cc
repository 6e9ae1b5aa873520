#include "record/run_record.h"

#include <fmt/format.h>

#include <cmath>

#include "core/model.h"
#include "core/sha256.h"
#include "record/stored_result.h"
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

std::string result_json_text(const core::EvaluationResult& r,
                             const std::vector<std::string>& reading) {
  return result_text(run_result(r, reading));
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
