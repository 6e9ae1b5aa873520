#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <algorithm>
#include <iostream>

#include "app/evaluate.h"
#include "cli/commands.h"
#include "cli/json_diff.h"
#include "cli/output.h"
#include "core/series_diff.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

using nlohmann::ordered_json;

struct CompareOptions {
  std::int64_t a = 0;
  std::int64_t b = 0;
  Format format = Format::table;
};

std::string text(const ordered_json& j) {
  if (j.is_null()) return "-";
  if (j.is_string()) return j.get<std::string>();
  if (j.is_number_float()) return fmt::format("{:.6g}", j.get<double>());
  return j.dump();
}

std::string change(const ordered_json& a, const ordered_json& b) {
  if (!a.is_number() || !b.is_number()) return a == b ? "" : "changed";
  const double d = b.get<double>() - a.get<double>();
  return d == 0 ? "" : fmt::format("{:+.6g}", d);
}

// Summarises what changed between two versions of one series.
std::string revision_summary(store::Ledger& ledger, const std::string& series, int va, int vb) {
  const auto a = ledger.load_version(series, va);
  const auto b = ledger.load_version(series, vb);
  std::size_t added = 0;
  std::size_t removed = 0;
  std::size_t changed = 0;
  for (const auto& d : core::diff_columns(a.columns, b.columns)) {
    added += d.added.size();
    removed += d.removed.size();
    changed += d.changed.size();
  }
  return fmt::format("v{} -> v{}: {} changed, {} added, {} removed", va, vb, changed, added,
                     removed);
}

std::vector<std::int64_t> sample_keys(store::Ledger& ledger, std::int64_t run_id) {
  auto request = app::request_from_run(ledger, run_id, true);
  request.keep_series = true;
  auto pending = app::evaluate_request(ledger, request);
  return pending.front().result.keys;
}

void run_compare(const CompareOptions& o, const GlobalOptions& global) {
  auto ledger_opened = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                          store::OpenMode::read_only, std::cerr);
  store::Ledger& ledger = *ledger_opened;
  const auto a = ledger.load_run(o.a);
  const auto b = ledger.load_run(o.b);

  ordered_json inputs = ordered_json::array();
  for (const auto& ia : a["inputs"]) {
    ordered_json entry = {
        {"role", ia["role"]},
        {"a", ia["series"].get<std::string>() + " v" + std::to_string(ia["version"].get<int>())}};
    const auto match =
        std::find_if(b["inputs"].begin(), b["inputs"].end(), [&](const ordered_json& ib) {
          return ib["role"] == ia["role"] &&
                 (ia["role"] != "factor" || ib["series"] == ia["series"]);
        });
    if (match == b["inputs"].end()) {
      entry["b"] = nullptr;
    } else {
      entry["b"] = (*match)["series"].get<std::string>() + " v" +
                   std::to_string((*match)["version"].get<int>());
      if ((*match)["series"] == ia["series"] && (*match)["version"] != ia["version"])
        entry["revision"] =
            revision_summary(ledger, ia["series"], ia["version"], (*match)["version"]);
    }
    entry["same"] = match != b["inputs"].end() && (*match)["content_hash"] == ia["content_hash"];
    inputs.push_back(entry);
  }
  // Inputs only run b has (a factor set the other run did not use).
  for (const auto& ib : b["inputs"]) {
    const bool in_a =
        std::any_of(a["inputs"].begin(), a["inputs"].end(), [&](const ordered_json& ia) {
          return ia["role"] == ib["role"] &&
                 (ib["role"] != "factor" || ia["series"] == ib["series"]);
        });
    if (!in_a)
      inputs.push_back(
          {{"role", ib["role"]},
           {"a", nullptr},
           {"b", ib["series"].get<std::string>() + " v" + std::to_string(ib["version"].get<int>())},
           {"same", false}});
  }

  ordered_json parameters = ordered_json::array();
  for (const auto& d : json_differences(a["parameters"], b["parameters"]))
    parameters.push_back({{"parameter", d.path}, {"a", d.before}, {"b", d.after}});

  const auto keys_a = sample_keys(ledger, o.a);
  const auto keys_b = sample_keys(ledger, o.b);
  std::vector<std::int64_t> gained;
  std::vector<std::int64_t> lost;
  std::set_difference(keys_b.begin(), keys_b.end(), keys_a.begin(), keys_a.end(),
                      std::back_inserter(gained));
  std::set_difference(keys_a.begin(), keys_a.end(), keys_b.begin(), keys_b.end(),
                      std::back_inserter(lost));
  const auto freq = core::parse_frequency(b["sample"]["frequency"].get<std::string>());
  const auto labels = [&](const std::vector<std::int64_t>& keys) {
    std::vector<std::string> out;
    out.reserve(keys.size());
    for (auto k : keys) out.push_back(core::period_label(*freq, k));
    return out;
  };
  const bool same_frequency = a["sample"]["frequency"] == b["sample"]["frequency"];
  ordered_json sample = {
      {"a",
       {{"first", a["sample"]["first"]},
        {"last", a["sample"]["last"]},
        {"observations", a["sample"]["observations"]}}},
      {"b",
       {{"first", b["sample"]["first"]},
        {"last", b["sample"]["last"]},
        {"observations", b["sample"]["observations"]}}},
      {"periods_gained", same_frequency ? ordered_json(labels(gained)) : ordered_json()},
      {"periods_lost", same_frequency ? ordered_json(labels(lost)) : ordered_json()}};

  ordered_json figures = ordered_json::array();
  for (const auto& ca : a["coefficients"]) {
    const auto cb = std::find_if(b["coefficients"].begin(), b["coefficients"].end(),
                                 [&](const ordered_json& c) { return c["term"] == ca["term"]; });
    for (const char* key : {"estimate", "std_error", "t_stat", "p_value"}) {
      const ordered_json vb = cb == b["coefficients"].end() ? ordered_json() : (*cb)[key];
      figures.push_back({{"figure", ca["term"].get<std::string>() + " " + key},
                         {"a", ca[key]},
                         {"b", vb},
                         {"change", change(ca[key], vb)}});
    }
  }
  // Terms only run b has.
  for (const auto& cb : b["coefficients"]) {
    const bool in_a = std::any_of(a["coefficients"].begin(), a["coefficients"].end(),
                                  [&](const ordered_json& c) { return c["term"] == cb["term"]; });
    if (in_a) continue;
    for (const char* key : {"estimate", "std_error", "t_stat", "p_value"})
      figures.push_back({{"figure", cb["term"].get<std::string>() + " " + key},
                         {"a", nullptr},
                         {"b", cb[key]},
                         {"change", change(ordered_json(), cb[key])}});
  }
  for (const auto& [key, va] : a["statistics"].items()) {
    const ordered_json vb = b["statistics"].contains(key) ? b["statistics"][key] : ordered_json();
    figures.push_back({{"figure", key}, {"a", va}, {"b", vb}, {"change", change(va, vb)}});
  }

  if (o.format == Format::json) {
    print_json(std::cout, {{"a", o.a},
                           {"b", o.b},
                           {"strategies", {a["strategy"], b["strategy"]}},
                           {"inputs", inputs},
                           {"parameters", parameters},
                           {"sample", sample},
                           {"figures", figures}});
    return;
  }
  Table t;
  t.header = {"", fmt::format("run {}", o.a), fmt::format("run {}", o.b), "change"};
  t.right_aligned = {false, true, true, true};
  t.rows.push_back({"strategy", a["strategy"], b["strategy"],
                    a["strategy"] == b["strategy"] ? "" : "different"});
  for (const auto& in : inputs)
    t.rows.push_back({"input " + in["role"].get<std::string>(), text(in["a"]), text(in["b"]),
                      in.contains("revision") ? in["revision"].get<std::string>()
                                              : (in["same"].get<bool>() ? "" : "different")});
  for (const auto& p : parameters)
    t.rows.push_back({"parameter " + p["parameter"].get<std::string>(), text(p["a"]), text(p["b"]),
                      "different"});
  t.rows.push_back({"sample",
                    fmt::format("{} to {}, T {}", text(sample["a"]["first"]),
                                text(sample["a"]["last"]), text(sample["a"]["observations"])),
                    fmt::format("{} to {}, T {}", text(sample["b"]["first"]),
                                text(sample["b"]["last"]), text(sample["b"]["observations"])),
                    same_frequency ? fmt::format("{} gained, {} lost", gained.size(), lost.size())
                                   : "other frequency"});
  for (const auto& f : figures)
    t.rows.push_back({f["figure"], text(f["a"]), text(f["b"]), f["change"]});
  if (o.format == Format::csv) {
    print_csv(std::cout, t);
    return;
  }
  print_table(std::cout, t);
  std::cout
      << "\nEstimates are decimals per period; ratios annualized as each run's parameters say.\n";
}

}  // namespace

void setup_compare(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<CompareOptions>();
  auto* cmd = app.add_subcommand("compare",
                                 "Show two runs side by side: inputs, parameters, sample, figures");
  cmd->add_option("run_a", o->a, "First run")->required();
  cmd->add_option("run_b", o->b, "Second run")->required();
  add_format_option(*cmd, o->format);
  cmd->callback([o, &global] { run_compare(*o, global); });
}

}  // namespace alphatrail::cli
