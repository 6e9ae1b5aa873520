#include "report/reports.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "core/annualize.h"
#include "core/evaluation.h"
#include "core/number_text.h"
#include "core/reading.h"
#include "report/charts.h"
#include "report/html.h"

namespace alphatrail::report {

namespace {

using nlohmann::ordered_json;

double num(const ordered_json& j) {
  return j.is_number() ? j.get<double>() : NAN;
}

std::string text(const ordered_json& j) {
  if (j.is_string()) return j.get<std::string>();
  if (j.is_null()) return "";
  return j.dump();
}

using core::fixed;
using core::p_value_text;

// "month" for a monthly run; the unit of "% per month".
std::string period_noun(const ordered_json& run) {
  const auto f = core::parse_frequency(run["sample"]["frequency"].get<std::string>());
  return f ? core::period_noun(*f) : "period";
}

int periods_per_year(const ordered_json& run) {
  return run["sample"]["periods_per_year"].get<int>();
}

const ordered_json& coefficient(const ordered_json& run, const std::string& term) {
  for (const auto& c : run["coefficients"])
    if (c["term"] == term) return c;
  static const ordered_json none = ordered_json::object();
  return none;
}

// Alpha's interval annualized as the run annualizes alpha.
struct AnnualAlpha {
  double estimate, low, high;
};
AnnualAlpha annual_alpha(const ordered_json& run) {
  const auto& a = coefficient(run, "alpha");
  const int per_year = periods_per_year(run);
  const auto convention =
      core::parse_annualize(run["parameters"]["annualize"].get<std::string>()).value();
  return {num(run["statistics"]["alpha_annualized"]),
          core::annualize(num(a["ci_low"]), convention, per_year),
          core::annualize(num(a["ci_high"]), convention, per_year)};
}

// "newey-west (5)", "hc3": for tables.
std::string short_errors(const ordered_json& stats) {
  const std::string kind = stats["errors"];
  return kind == "newey-west" ? fmt::format("newey-west ({})", stats["lags"].get<int>()) : kind;
}

std::string run_label(const ordered_json& run) {
  return fmt::format("run {}", run["run_id"].get<std::int64_t>());
}

std::string versions_used(const ordered_json& run) {
  std::vector<std::string> parts;
  for (const auto& in : run["inputs"])
    parts.push_back(fmt::format("{} v{}", text(in["series"]), in["version"].get<int>()));
  return fmt::format("{}", fmt::join(parts, ", "));
}

bool is_caution(const std::string& sentence) {
  const auto& cautions = core::standard_cautions();
  return std::find(cautions.begin(), cautions.end(), sentence) != cautions.end();
}

// The cautions every page carries, with the run-specific warnings first.
Section cautions_section(const std::vector<std::string>& warnings) {
  Section s{"Cautions", {}};
  for (const auto& w : warnings) s.blocks.push_back(Paragraph{w, true});
  for (const auto& c : core::standard_cautions()) s.blocks.push_back(Paragraph{c, true});
  return s;
}

HtmlTable coefficient_table(const ordered_json& run) {
  HtmlTable t{{"term", "estimate", "std error", "t", "p", "interval low", "interval high"},
              {},
              {false, true, true, true, true, true, true},
              fmt::format("Coefficients: alpha is a decimal return per {}; slopes are unitless; "
                          "{:g}% intervals from Student t with {} degrees of freedom.",
                          period_noun(run), 100 * num(run["statistics"]["confidence"]),
                          run["statistics"]["degrees_of_freedom"].get<int>())};
  for (const auto& c : run["coefficients"])
    t.rows.push_back({text(c["term"]), fixed(num(c["estimate"]), 6), fixed(num(c["std_error"]), 6),
                      fixed(num(c["t_stat"]), 2), p_value_text(num(c["p_value"])),
                      fixed(num(c["ci_low"]), 6), fixed(num(c["ci_high"]), 6)});
  return t;
}

Facts statistics_facts(const ordered_json& run) {
  const auto& s = run["statistics"];
  const std::string unit = "per " + period_noun(run);
  const AnnualAlpha a = annual_alpha(run);
  return Facts{{
      {"alpha annualized",
       fmt::format("{} a year ({}; interval {} to {})", core::signed_percent(a.estimate),
                   text(run["parameters"]["annualize"]), core::signed_percent(a.low),
                   core::signed_percent(a.high))},
      {"R-squared", fmt::format("{} (adjusted {})", fixed(num(s["r_squared"]), 3),
                                fixed(num(s["adj_r_squared"]), 3))},
      {"residual sd", fmt::format("{} {} (decimal)", fixed(num(s["residual_std"]), 5), unit)},
      {"F statistic", fmt::format("{} (p {}), classic", fixed(num(s["f_stat"]), 2),
                                  p_value_text(num(s["f_p_value"])))},
      {"Sharpe ratio",
       fmt::format("strategy {}, benchmark {} (annualized)", fixed(num(s["sharpe_strategy"]), 2),
                   fixed(num(s["sharpe_benchmark"]), 2))},
      {"appraisal ratio",
       fmt::format("{} (alpha / residual sd, annualized)", fixed(num(s["appraisal_ratio"]), 2))},
      {"Treynor ratio", fmt::format("{} a year", core::signed_percent(num(s["treynor_ratio"])))},
      {"tracking error", fmt::format("{} a year; information ratio {}",
                                     core::signed_percent(num(s["tracking_error"])),
                                     fixed(num(s["information_ratio"]), 2))},
      {"correlation", fixed(num(s["correlation"]), 3)},
      {"up / down beta",
       fmt::format("{} ({} periods) / {} ({} periods)", fixed(num(s["up_market_beta"]), 2),
                   text(s["up_periods"]), fixed(num(s["down_market_beta"]), 2),
                   text(s["down_periods"]))},
      {"mean excess return",
       fmt::format("strategy {}, benchmark {} {}",
                   core::signed_percent(num(s["mean_excess_strategy"]), 3),
                   core::signed_percent(num(s["mean_excess_benchmark"]), 3), unit)},
      {"standard errors", describe_errors(s)},
  }};
}

// Growth of one unit from per-period returns, and the drawdown from the running peak.
std::vector<double> growth(const std::vector<double>& returns) {
  std::vector<double> out;
  out.reserve(returns.size());
  double level = 1.0;
  for (double r : returns) out.push_back(level *= 1.0 + r);
  return out;
}

std::vector<double> drawdown(const std::vector<double>& levels) {
  std::vector<double> out;
  out.reserve(levels.size());
  double peak = 1.0;
  for (double v : levels) {
    peak = std::max(peak, v);
    out.push_back(v / peak - 1.0);
  }
  return out;
}

void add_rolling(Section& s, const RunReportInput& in) {
  const auto& rolling = in.rolling;
  if (!rolling.is_object() || !rolling["windows"].is_array() || rolling["windows"].empty()) {
    s.blocks.push_back(Paragraph{"The sample is too short for rolling estimates.", false});
    return;
  }
  BandInput alpha{"rolling-alpha",
                  "Rolling alpha, annualized",
                  {},
                  {},
                  {},
                  {},
                  0.0,
                  "alpha = 0",
                  true,
                  fmt::format("alpha, % a year ({})", text(rolling["annualize"])),
                  fmt::format("{:g}% confidence interval", 100 * num(rolling["confidence"]))};
  BandInput beta{"rolling-beta", "Rolling beta",  {}, {}, {}, {}, 1.0, "beta = 1", false,
                 "beta",         alpha.band_label};
  for (const auto& w : rolling["windows"]) {
    alpha.periods.push_back(text(w["end"]));
    alpha.estimate.push_back(num(w["alpha_annualized"]));
    alpha.lower.push_back(num(w["alpha_annualized_ci_low"]));
    alpha.upper.push_back(num(w["alpha_annualized_ci_high"]));
    beta.estimate.push_back(num(w["beta"]));
    beta.lower.push_back(num(w["beta_ci_low"]));
    beta.upper.push_back(num(w["beta_ci_high"]));
  }
  beta.periods = alpha.periods;
  const std::string how = fmt::format(
      "Windows of {} {}s ending at each period shown, {} errors{}", text(rolling["window"]),
      period_noun(in.run), text(rolling["errors"]),
      in.rolling_from_run ? ", stored with the run."
                          : "; computed for this page with the default window (the run was "
                            "recorded without --rolling), not part of the run.");
  s.blocks.push_back(Figure{band_chart(alpha), how});
  s.blocks.push_back(Figure{band_chart(beta), how});
}

Section provenance_section(const RunReportInput& in) {
  const auto& run = in.run;
  Section s{"Provenance", {}};
  s.blocks.push_back(Facts{{{"inputs hash", text(run["inputs_hash"])},
                            {"record hash", text(run["record_hash"])},
                            {"engine", text(run["engine_version"])},
                            {"recorded", text(run["created_at"]) + " UTC"},
                            {"recomputed sample", in.reproduction}}});
  HtmlTable inputs{{"role", "series", "version", "columns", "source file", "note", "content hash"},
                   {},
                   {false, false, true, false, false, false, false},
                   "Every input version the run used (the content hash covers every value).",
                   true};
  for (const auto& i : run["inputs"]) {
    std::string version = fmt::format("v{}", i["version"].get<int>());
    if (i["latest_version"].is_number() && i["latest_version"] != i["version"])
      version += fmt::format(" (latest v{})", i["latest_version"].get<int>());
    inputs.rows.push_back({text(i["role"]), text(i["series"]), version, text(i["columns"]),
                           text(i["source_file"]), text(i["note"]), text(i["content_hash"])});
  }
  s.blocks.push_back(inputs);
  HtmlTable params{
      {"parameter", "value"}, {}, {false, false}, "Parameters, every default written out.", true};
  for (const auto& [key, value] : run["parameters"].items())
    params.rows.push_back({key, value.is_string() ? value.get<std::string>() : value.dump()});
  s.blocks.push_back(params);
  std::vector<std::string> steps;
  for (const auto& p : run["preparation"]) steps.push_back(text(p));
  s.blocks.push_back(Paragraph{"Data preparation, step by step:", false});
  s.blocks.push_back(BulletList{steps});
  return s;
}

Section revision_section(const ordered_json& run, const ordered_json& old) {
  Section s{fmt::format("What changed since run {}", old["run_id"].get<std::int64_t>()), {}};
  s.blocks.push_back(Paragraph{
      fmt::format("This run revises run {} (recorded {} UTC): the same evaluation on the inputs "
                  "as they stand now.",
                  old["run_id"].get<std::int64_t>(), text(old["created_at"])),
      false});
  HtmlTable inputs{
      {"role", "series", "before", "after", "content hash after"}, {}, {}, "Inputs.", true};
  for (std::size_t i = 0; i < run["inputs"].size(); ++i) {
    const auto& now = run["inputs"][i];
    const ordered_json* then = nullptr;
    for (const auto& o : old["inputs"])
      if (o["role"] == now["role"] && o["series"] == now["series"]) then = &o;
    const std::string before = then ? fmt::format("v{}", (*then)["version"].get<int>()) : "absent";
    const std::string after = fmt::format("v{}", now["version"].get<int>());
    inputs.rows.push_back({text(now["role"]), text(now["series"]), before,
                           before == after ? after + " (unchanged)" : after,
                           text(now["content_hash"])});
  }
  s.blocks.push_back(inputs);
  const AnnualAlpha a0 = annual_alpha(old);
  const AnnualAlpha a1 = annual_alpha(run);
  const auto row = [](const char* what, const std::string& b, const std::string& a) {
    return std::vector<std::string>{what, b, a};
  };
  HtmlTable figures{{"figure", "before", "after"}, {}, {false, true, true}, "Headline figures."};
  figures.rows.push_back(
      row("alpha a year", core::signed_percent(a0.estimate), core::signed_percent(a1.estimate)));
  figures.rows.push_back(row("alpha t", fixed(num(coefficient(old, "alpha")["t_stat"]), 2),
                             fixed(num(coefficient(run, "alpha")["t_stat"]), 2)));
  figures.rows.push_back(row("alpha p", p_value_text(num(coefficient(old, "alpha")["p_value"])),
                             p_value_text(num(coefficient(run, "alpha")["p_value"]))));
  figures.rows.push_back(row("beta", fixed(num(coefficient(old, "beta")["estimate"]), 3),
                             fixed(num(coefficient(run, "beta")["estimate"]), 3)));
  figures.rows.push_back(row("R-squared", fixed(num(old["statistics"]["r_squared"]), 3),
                             fixed(num(run["statistics"]["r_squared"]), 3)));
  figures.rows.push_back(
      row("periods", text(old["sample"]["observations"]), text(run["sample"]["observations"])));
  s.blocks.push_back(figures);
  return s;
}

}  // namespace

std::string describe_errors(const ordered_json& stats) {
  const std::string kind = stats["errors"];
  if (kind == "newey-west")
    return fmt::format("Newey-West, {} lags, {}", stats["lags"].get<int>(),
                       stats["small_sample_factor"].get<bool>() ? "small-sample factor T/(T-k)"
                                                                : "no small-sample factor");
  if (kind == "classic") return "classic (homoskedastic)";
  return fmt::format("White {}", kind == "hc1"   ? "HC1 (HC0 x T/(T-k))"
                                 : kind == "hc0" ? "HC0"
                                 : kind == "hc2" ? "HC2"
                                                 : "HC3");
}

std::string run_report(const RunReportInput& in) {
  const auto& run = in.run;
  const auto& sample = run["sample"];
  const std::string unit = period_noun(run);
  Page page;
  page.title = fmt::format("Run {}: {} against {}", run["run_id"].get<std::int64_t>(),
                           text(run["strategy"]), text(run["benchmark"]));
  const auto& alpha = coefficient(run, "alpha");
  page.subtitle = fmt::format("alpha {} a year (t {}, p {}), beta {}, {} {} periods",
                              core::signed_percent(annual_alpha(run).estimate),
                              fixed(num(alpha["t_stat"]), 2), p_value_text(num(alpha["p_value"])),
                              fixed(num(coefficient(run, "beta")["estimate"]), 3),
                              text(sample["observations"]), text(sample["frequency"]));
  page.facts.items = {
      {"strategy", text(run["strategy"])},
      {"benchmark", text(run["benchmark"])},
      {"risk-free rate", text(run["rate"])},
      {"factors", run["factors"].is_string() ? text(run["factors"]) : "none (single-index model)"},
      {"sample",
       fmt::format("{} to {}, {} periods ({} dropped)", text(sample["first"]), text(sample["last"]),
                   text(sample["observations"]), text(sample["dropped"]))},
      {"frequency", text(sample["frequency"])},
      {"standard errors", describe_errors(run["statistics"])},
      {"inputs hash", text(run["inputs_hash"])},
  };
  if (run["study"].is_string()) page.facts.items.push_back({"study", text(run["study"])});
  if (run["note"].is_string()) page.facts.items.push_back({"note", text(run["note"])});

  const auto& d = in.data;
  Section fit{"The fit", {}};
  ScatterInput scatter{"scatter",
                       "Strategy against benchmark, excess returns",
                       d.benchmark_excess,
                       d.strategy_excess,
                       num(alpha["estimate"]),
                       num(coefficient(run, "beta")["estimate"]),
                       unit};
  fit.blocks.push_back(Figure{
      scatter_chart(scatter),
      fmt::format("One dot per {} ({} dots): excess returns over the risk-free rate, % per {}. "
                  "The line is alpha + beta x{}; the marked point on the vertical axis is alpha.",
                  unit, d.strategy_excess.size(), unit,
                  run["factors"].is_string() ? " with the factors at zero" : "")});
  fit.blocks.push_back(coefficient_table(run));
  fit.blocks.push_back(statistics_facts(run));

  Section reading{"Reading", {}};
  std::vector<std::string> sentences;
  for (const auto& r : run["reading"])
    if (!is_caution(text(r))) sentences.push_back(text(r));  // cautions get their own box
  reading.blocks.push_back(BulletList{sentences});

  Section rolling{"Through time", {}};
  add_rolling(rolling, in);

  Section money{"Growth and drawdown", {}};
  std::vector<double> strategy_total;
  std::vector<double> benchmark_total;
  for (std::size_t t = 0; t < d.periods.size(); ++t) {
    strategy_total.push_back(d.strategy_excess[t] + d.risk_free[t]);
    benchmark_total.push_back(d.benchmark_excess[t] + d.risk_free[t]);
  }
  const auto strategy_growth = growth(strategy_total);
  LinesInput lines{"growth",
                   "Growth of one unit",
                   d.periods,
                   {{text(run["strategy"]), strategy_growth},
                    {text(run["benchmark"]), growth(benchmark_total)},
                    {"risk-free", growth(d.risk_free)}},
                   "value of 1 unit invested at the start",
                   1.0};
  money.blocks.push_back(Figure{
      lines_chart(lines),
      fmt::format("Compounded {} returns over the aligned sample, {} to {}; no costs or fees "
                  "beyond those in the series.",
                  text(sample["frequency"]), text(sample["first"]), text(sample["last"]))});
  money.blocks.push_back(Figure{
      drawdown_chart({"drawdown", "Strategy drawdown", d.periods, drawdown(strategy_growth)}),
      "Fall from the previous peak of the strategy's growth of one unit, %."});

  Section residuals{"Residuals", {}};
  residuals.blocks.push_back(Figure{
      histogram_chart({"residuals", "Distribution of residuals", d.residuals, true,
                       fmt::format("residual, % per {}", unit)}),
      "Bars: residuals of the regression binned; curve: the normal density with their mean and "
      "standard deviation, scaled to counts. Fat tails or skew weaken classic errors."});

  std::vector<std::string> warnings;
  for (const auto& w : run["warnings"]) warnings.push_back(text(w));
  page.sections = {
      fit, reading, rolling, money, residuals, cautions_section(warnings), provenance_section(in)};
  if (in.revised) page.sections.push_back(revision_section(run, *in.revised));
  page.footer = in.made_by;
  return render_page(page);
}

std::string strategy_report(const StrategyReportInput& in) {
  Page page;
  page.title = fmt::format("Strategy {}: history of its runs", in.strategy);
  const std::size_t revisions = static_cast<std::size_t>(
      std::count_if(in.runs.begin(), in.runs.end(),
                    [](const ordered_json& r) { return r["revises_run_id"].is_number(); }));
  page.subtitle = fmt::format("{} run{}, {} of them revisions; {} version{} of the series",
                              in.runs.size(), in.runs.size() == 1 ? "" : "s", revisions,
                              in.versions.size(), in.versions.size() == 1 ? "" : "s");
  if (!in.runs.empty())
    page.facts.items = {{"first run", text(in.runs.front()["created_at"]) + " UTC"},
                        {"latest run", text(in.runs.back()["created_at"]) + " UTC"}};

  IntervalsInput chart{
      "history", "Alpha per run, annualized, with its interval", {}, true, "alpha, % a year"};
  HtmlTable table{{"run", "recorded (UTC)", "errors", "periods", "alpha a year", "interval", "t",
                   "beta", "revises", "input versions"},
                  {},
                  {true, false, false, true, true, true, true, true, true, false},
                  "Every run of the strategy, oldest first."};
  for (const auto& run : in.runs) {
    const AnnualAlpha a = annual_alpha(run);
    const bool revision = run["revises_run_id"].is_number();
    chart.items.push_back({run_label(run), a.estimate, a.low, a.high, revision});
    table.rows.push_back(
        {text(run["run_id"]), text(run["created_at"]), short_errors(run["statistics"]),
         text(run["sample"]["observations"]), core::signed_percent(a.estimate),
         fmt::format("{} to {}", core::signed_percent(a.low), core::signed_percent(a.high)),
         fixed(num(coefficient(run, "alpha")["t_stat"]), 2),
         fixed(num(coefficient(run, "beta")["estimate"]), 3),
         revision ? fmt::format("run {}", run["revises_run_id"].get<std::int64_t>()) : "",
         versions_used(run)});
  }
  Section history{"Alpha through the ledger's history", {}};
  history.blocks.push_back(Figure{
      intervals_chart(chart),
      "One row per run in the order recorded: the point is alpha annualized as the run "
      "annualizes it, the bar its confidence interval; hollow diamonds mark revisions (re-runs "
      "after an input was revised)."});
  history.blocks.push_back(table);

  Section versions{"Versions of the series", {}};
  HtmlTable vt{{"version", "ingested (UTC)", "source file", "note", "content hash"},
               {},
               {true, false, false, false, false},
               "Every stored version; none is ever overwritten.",
               true};
  for (const auto& v : in.versions)
    vt.rows.push_back(
        {fmt::format("v{}", v.version), v.ingested_at, v.source_file, v.note, v.content_hash});
  versions.blocks.push_back(vt);
  std::vector<std::string> warnings;
  if (in.runs.size() > 1)
    warnings.push_back(
        fmt::format("{} runs of one strategy: choosing the run you like best overstates alpha.",
                    in.runs.size()));
  page.sections = {history, versions, cautions_section(warnings)};
  page.footer = in.made_by;
  return render_page(page);
}

std::string study_report(const StudyReportInput& in) {
  Page page;
  page.title = fmt::format("Study {}: {} trials side by side", in.study, in.runs.size());
  RankedInput chart{"study",
                    "Alpha t statistic of every run",
                    {},
                    {},
                    in.runs.size(),
                    3.0,
                    1.96,
                    "t statistic of alpha"};
  std::vector<double> t_stats;
  for (const auto& run : in.runs) {
    chart.labels.push_back(
        fmt::format("{} {}", run["run_id"].get<std::int64_t>(), text(run["strategy"])));
    t_stats.push_back(num(coefficient(run, "alpha")["t_stat"]));
  }
  chart.t_stats = t_stats;
  const auto order = ranked_order(t_stats);
  const auto clear = std::count_if(t_stats.begin(), t_stats.end(),
                                   [](double t) { return std::isfinite(t) && t >= 3.0; });
  const auto conventional = std::count_if(t_stats.begin(), t_stats.end(),
                                          [](double t) { return std::isfinite(t) && t >= 1.96; });
  page.subtitle = fmt::format("{} of {} runs clear t = 3; {} clear the conventional 1.96", clear,
                              in.runs.size(), conventional);

  Section ranked{"Variants ranked by alpha's t statistic", {}};
  ranked.blocks.push_back(Figure{
      ranked_bars_chart(chart),
      fmt::format("{} trials recorded in the study, re-runs included. With many variants tried, "
                  "the best t statistic is biased upward: t = 3 is a common bar for a new idea "
                  "(Harvey, Liu & Zhu 2016); 1.96 is the single-test 5% level.",
                  in.runs.size())});
  HtmlTable table{{"rank", "run", "strategy", "recorded (UTC)", "alpha a year", "t", "p", "beta",
                   "periods", "errors"},
                  {},
                  {true, true, false, false, true, true, true, true, true, false},
                  "Runs from the highest t statistic down."};
  std::size_t rank = 0;
  for (const std::size_t i : order) {
    const auto& run = in.runs[i];
    const auto& a = coefficient(run, "alpha");
    table.rows.push_back({std::to_string(++rank), text(run["run_id"]), text(run["strategy"]),
                          text(run["created_at"]), core::signed_percent(annual_alpha(run).estimate),
                          fixed(num(a["t_stat"]), 2), p_value_text(num(a["p_value"])),
                          fixed(num(coefficient(run, "beta")["estimate"]), 3),
                          text(run["sample"]["observations"]), short_errors(run["statistics"])});
  }
  ranked.blocks.push_back(table);
  page.sections = {ranked,
                   cautions_section({fmt::format(
                       "{} trials: the more variants tried, the more likely the best one's alpha "
                       "is luck.",
                       in.runs.size())})};
  page.footer = in.made_by;
  return render_page(page);
}

}  // namespace alphatrail::report
