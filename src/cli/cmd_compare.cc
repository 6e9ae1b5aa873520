#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <iostream>

#include "app/compare.h"
#include "cli/commands.h"
#include "cli/output.h"
#include "cli/render.h"
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

// The change from a to b: a signed difference of numbers, "changed" for other values that
// differ, empty when they are the same.
std::string change(const ordered_json& a, const ordered_json& b) {
  if (!a.is_number() || !b.is_number()) return a == b ? "" : "changed";
  const double d = b.get<double>() - a.get<double>();
  return d == 0 ? "" : fmt::format("{:+.6g}", d);
}

ordered_json version_json(const std::optional<app::UsedVersion>& used) {
  if (!used) return nullptr;
  return fmt::format("{} v{}", used->series, used->version);
}

std::string revision_text(const app::RevisionCounts& r) {
  return fmt::format("v{} -> v{}: {} changed, {} added, {} removed", r.from_version, r.to_version,
                     r.changed, r.added, r.removed);
}

ordered_json span_json(const app::SampleSpan& span) {
  return {{"first", span.first}, {"last", span.last}, {"observations", span.observations}};
}

std::string span_text(const app::SampleSpan& span) {
  return fmt::format("{} to {}, T {}", span.first, span.last, span.observations);
}

View comparison_view(const app::Comparison& c) {
  View view;
  ordered_json inputs = ordered_json::array();
  for (const auto& in : c.inputs) {
    ordered_json entry = {{"role", in.role}, {"a", version_json(in.a)}, {"b", version_json(in.b)}};
    if (in.revision) entry["revision"] = revision_text(*in.revision);
    entry["same"] = in.same;
    inputs.push_back(entry);
  }
  ordered_json parameters = ordered_json::array();
  for (const auto& d : c.parameters)
    parameters.push_back({{"parameter", d.path}, {"a", d.before}, {"b", d.after}});
  const app::SampleComparison& s = c.sample;
  const ordered_json sample = {
      {"a", span_json(s.a)},
      {"b", span_json(s.b)},
      {"periods_gained", s.same_frequency ? ordered_json(s.periods_gained) : ordered_json()},
      {"periods_lost", s.same_frequency ? ordered_json(s.periods_lost) : ordered_json()}};
  ordered_json figures = ordered_json::array();
  for (const auto& f : c.figures)
    figures.push_back({{"figure", f.figure}, {"a", f.a}, {"b", f.b}, {"change", change(f.a, f.b)}});
  view.json = {{"a", c.run_a},
               {"b", c.run_b},
               {"strategies", {c.strategy_a, c.strategy_b}},
               {"inputs", inputs},
               {"parameters", parameters},
               {"sample", sample},
               {"figures", figures}};

  Table& t = view.table;
  t.header = {"", fmt::format("run {}", c.run_a), fmt::format("run {}", c.run_b), "change"};
  t.right_aligned = {false, true, true, true};
  t.rows.push_back(
      {"strategy", c.strategy_a, c.strategy_b, c.strategy_a == c.strategy_b ? "" : "different"});
  for (const auto& in : c.inputs)
    t.rows.push_back({"input " + in.role, text(version_json(in.a)), text(version_json(in.b)),
                      in.revision ? revision_text(*in.revision) : (in.same ? "" : "different")});
  for (const auto& p : c.parameters)
    t.rows.push_back({"parameter " + p.path, text(p.before), text(p.after), "different"});
  t.rows.push_back({"sample", span_text(s.a), span_text(s.b),
                    s.same_frequency ? fmt::format("{} gained, {} lost", s.periods_gained.size(),
                                                   s.periods_lost.size())
                                     : "other frequency"});
  for (const auto& f : c.figures)
    t.rows.push_back({f.figure, text(f.a), text(f.b), change(f.a, f.b)});
  view.footnote =
      "Estimates are decimals per period; ratios annualized as each run's parameters say.\n";
  return view;
}

void run_compare(const CompareOptions& o, const GlobalOptions& global) {
  auto ledger = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                   store::OpenMode::read_only, std::cerr);
  render(std::cout, comparison_view(app::compare_runs(*ledger, o.a, o.b)), o.format);
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
