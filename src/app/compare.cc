#include "app/compare.h"

#include <algorithm>
#include <iterator>
#include <utility>

#include "app/evaluate.h"
#include "core/dates.h"
#include "core/series_diff.h"

namespace alphatrail::app {

namespace {

using nlohmann::ordered_json;

// Counts what changed between two versions of one series.
RevisionCounts revision_counts(store::Ledger& ledger, const std::string& series, int va, int vb) {
  const auto a = ledger.load_version(series, va);
  const auto b = ledger.load_version(series, vb);
  RevisionCounts counts;
  counts.from_version = va;
  counts.to_version = vb;
  for (const auto& d : core::diff_columns(a.columns, b.columns)) {
    counts.added += d.added.size();
    counts.removed += d.removed.size();
    counts.changed += d.changed.size();
  }
  return counts;
}

std::vector<std::int64_t> sample_keys(store::Ledger& ledger, std::int64_t run_id) {
  auto request = request_from_run(ledger, run_id, true);
  request.keep_series = true;
  auto pending = evaluate_request(ledger, request);
  return pending.front().result.keys;
}

UsedVersion used_version(const ordered_json& input) {
  return {input["series"].get<std::string>(), input["version"].get<int>()};
}

// Inputs pair up by role; factors by role and series.
bool same_input(const ordered_json& x, const ordered_json& y) {
  return x["role"] == y["role"] && (x["role"] != "factor" || x["series"] == y["series"]);
}

std::vector<InputComparison> compare_inputs(store::Ledger& ledger, const ordered_json& a,
                                            const ordered_json& b) {
  std::vector<InputComparison> inputs;
  for (const auto& ia : a) {
    InputComparison entry;
    entry.role = ia["role"].get<std::string>();
    entry.a = used_version(ia);
    const auto match = std::find_if(b.begin(), b.end(),
                                    [&](const ordered_json& ib) { return same_input(ia, ib); });
    if (match != b.end()) {
      entry.b = used_version(*match);
      if ((*match)["series"] == ia["series"] && (*match)["version"] != ia["version"])
        entry.revision = revision_counts(ledger, ia["series"], ia["version"], (*match)["version"]);
      entry.same = (*match)["content_hash"] == ia["content_hash"];
    }
    inputs.push_back(std::move(entry));
  }
  // Inputs only run b has (a factor set the other run did not use).
  for (const auto& ib : b) {
    const bool in_a =
        std::any_of(a.begin(), a.end(), [&](const ordered_json& ia) { return same_input(ib, ia); });
    if (in_a) continue;
    InputComparison entry;
    entry.role = ib["role"].get<std::string>();
    entry.b = used_version(ib);
    inputs.push_back(std::move(entry));
  }
  return inputs;
}

SampleSpan sample_span(const ordered_json& sample) {
  return {sample["first"].get<std::string>(), sample["last"].get<std::string>(),
          sample["observations"].get<std::int64_t>()};
}

SampleComparison compare_samples(store::Ledger& ledger, const ordered_json& a,
                                 const ordered_json& b) {
  SampleComparison sample;
  sample.a = sample_span(a["sample"]);
  sample.b = sample_span(b["sample"]);
  const auto keys_a = sample_keys(ledger, a["run_id"].get<std::int64_t>());
  const auto keys_b = sample_keys(ledger, b["run_id"].get<std::int64_t>());
  sample.same_frequency = a["sample"]["frequency"] == b["sample"]["frequency"];
  if (!sample.same_frequency) return sample;
  const auto frequency = core::parse_frequency(b["sample"]["frequency"].get<std::string>());
  const auto labels = [&](const std::vector<std::int64_t>& keys) {
    std::vector<std::string> out;
    out.reserve(keys.size());
    for (auto k : keys) out.push_back(core::period_label(*frequency, k));
    return out;
  };
  std::vector<std::int64_t> gained;
  std::vector<std::int64_t> lost;
  std::set_difference(keys_b.begin(), keys_b.end(), keys_a.begin(), keys_a.end(),
                      std::back_inserter(gained));
  std::set_difference(keys_a.begin(), keys_a.end(), keys_b.begin(), keys_b.end(),
                      std::back_inserter(lost));
  sample.periods_gained = labels(gained);
  sample.periods_lost = labels(lost);
  return sample;
}

std::vector<FigureComparison> compare_figures(const ordered_json& a, const ordered_json& b) {
  static constexpr const char* kCoefficientFigures[] = {"estimate", "std_error", "t_stat",
                                                        "p_value"};
  std::vector<FigureComparison> figures;
  const auto& ca_all = a["coefficients"];
  const auto& cb_all = b["coefficients"];
  for (const auto& ca : ca_all) {
    const auto cb = std::find_if(cb_all.begin(), cb_all.end(),
                                 [&](const ordered_json& c) { return c["term"] == ca["term"]; });
    for (const char* key : kCoefficientFigures)
      figures.push_back({ca["term"].get<std::string>() + " " + key, ca[key],
                         cb == cb_all.end() ? ordered_json() : (*cb)[key]});
  }
  // Terms only run b has.
  for (const auto& cb : cb_all) {
    const bool in_a = std::any_of(ca_all.begin(), ca_all.end(),
                                  [&](const ordered_json& c) { return c["term"] == cb["term"]; });
    if (in_a) continue;
    for (const char* key : kCoefficientFigures)
      figures.push_back({cb["term"].get<std::string>() + " " + key, ordered_json(), cb[key]});
  }
  for (const auto& [key, va] : a["statistics"].items())
    figures.push_back(
        {key, va, b["statistics"].contains(key) ? b["statistics"][key] : ordered_json()});
  return figures;
}

}  // namespace

Comparison compare_runs(store::Ledger& ledger, std::int64_t a, std::int64_t b) {
  Comparison c;
  ledger.read_transaction([&] {
    const auto run_a = ledger.load_run(a);
    const auto run_b = ledger.load_run(b);
    c.run_a = a;
    c.run_b = b;
    c.strategy_a = run_a["strategy"].get<std::string>();
    c.strategy_b = run_b["strategy"].get<std::string>();
    c.inputs = compare_inputs(ledger, run_a["inputs"], run_b["inputs"]);
    c.parameters = json_differences(run_a["parameters"], run_b["parameters"]);
    c.sample = compare_samples(ledger, run_a, run_b);
    c.figures = compare_figures(run_a, run_b);
  });
  return c;
}

}  // namespace alphatrail::app
