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

using core::fixed;
using core::p_value_text;
using record::ShownRun;

// "month" for a monthly run; the unit of "% per month".
std::string period_noun(const ShownRun& run) {
  return core::period_noun(run.result.sample.frequency);
}

// The figures of a term; NaN throughout for a term the run does not have.
const core::Coefficient& coefficient(const ShownRun& run, std::string_view term) {
  static const core::Coefficient none{"", NAN, NAN, NAN, NAN, NAN, NAN};
  const core::Coefficient* c = record::find_coefficient(run.result, term);
  return c ? *c : none;
}

// Alpha's interval annualized as the run annualizes alpha.
struct AnnualAlpha {
  double estimate, low, high;
};
AnnualAlpha annual_alpha(const ShownRun& run) {
  const auto& a = coefficient(run, "alpha");
  const int per_year = run.result.sample.periods_per_year;
  const auto convention = run.parameters.annualize;
  return {run.result.statistics.alpha_annualized, core::annualize(a.ci_low, convention, per_year),
          core::annualize(a.ci_high, convention, per_year)};
}

// "newey-west (5)", "hc3": for tables.
std::string short_errors(const record::StoredStatistics& stats) {
  const std::string kind = core::error_kind_name(stats.errors);
  return stats.errors == core::ErrorKind::newey_west ? fmt::format("{} ({})", kind, stats.lags)
                                                     : kind;
}

std::string run_label(const ShownRun& run) {
  return fmt::format("run {}", run.row.run_id);
}

std::string versions_used(const ShownRun& run) {
  std::vector<std::string> parts;
  for (const auto& in : run.inputs) parts.push_back(fmt::format("{} v{}", in.series, in.version));
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

HtmlTable coefficient_table(const ShownRun& run) {
  const auto& stats = run.result.statistics;
  HtmlTable t{{"term", "estimate", "std error", "t", "p", "interval low", "interval high"},
              {},
              {false, true, true, true, true, true, true},
              fmt::format("Coefficients: alpha is a decimal return per {}; slopes are unitless; "
                          "{:g}% intervals from Student t with {} degrees of freedom.",
                          period_noun(run), 100 * stats.confidence, stats.degrees_of_freedom)};
  for (const auto& c : run.result.coefficients)
    t.rows.push_back({c.term, fixed(c.estimate, 6), fixed(c.std_error, 6), fixed(c.t_stat, 2),
                      p_value_text(c.p_value), fixed(c.ci_low, 6), fixed(c.ci_high, 6)});
  return t;
}

Facts statistics_facts(const ShownRun& run) {
  const auto& s = run.result.statistics;
  const std::string unit = "per " + period_noun(run);
  const AnnualAlpha a = annual_alpha(run);
  return Facts{{
      {"alpha annualized",
       fmt::format("{} a year ({}; interval {} to {})", core::signed_percent(a.estimate),
                   core::annualize_name(run.parameters.annualize), core::signed_percent(a.low),
                   core::signed_percent(a.high))},
      {"R-squared",
       fmt::format("{} (adjusted {})", fixed(s.r_squared, 3), fixed(s.adj_r_squared, 3))},
      {"residual sd", fmt::format("{} {} (decimal)", fixed(s.residual_std, 5), unit)},
      {"F statistic",
       fmt::format("{} (p {}), classic", fixed(s.f_stat, 2), p_value_text(s.f_p_value))},
      {"Sharpe ratio", fmt::format("strategy {}, benchmark {} (annualized)",
                                   fixed(s.sharpe_strategy, 2), fixed(s.sharpe_benchmark, 2))},
      {"appraisal ratio",
       fmt::format("{} (alpha / residual sd, annualized)", fixed(s.appraisal_ratio, 2))},
      {"Treynor ratio", fmt::format("{} a year", core::signed_percent(s.treynor_ratio))},
      {"tracking error",
       fmt::format("{} a year; information ratio {}", core::signed_percent(s.tracking_error),
                   fixed(s.information_ratio, 2))},
      {"correlation", fixed(s.correlation, 3)},
      {"up / down beta",
       fmt::format("{} ({} periods) / {} ({} periods)", fixed(s.up_market_beta, 2), s.up_periods,
                   fixed(s.down_market_beta, 2), s.down_periods)},
      {"mean excess return",
       fmt::format("strategy {}, benchmark {} {}", core::signed_percent(s.mean_excess_strategy, 3),
                   core::signed_percent(s.mean_excess_benchmark, 3), unit)},
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
  if (!in.rolling || in.rolling->windows.empty()) {
    s.blocks.push_back(Paragraph{"The sample is too short for rolling estimates.", false});
    return;
  }
  const auto& rolling = *in.rolling;
  BandInput alpha{"rolling-alpha",
                  "Rolling alpha, annualized",
                  {},
                  {},
                  {},
                  {},
                  0.0,
                  "alpha = 0",
                  true,
                  fmt::format("alpha, % a year ({})", core::annualize_name(rolling.annualize)),
                  fmt::format("{:g}% confidence interval", 100 * rolling.confidence)};
  BandInput beta{"rolling-beta", "Rolling beta",  {}, {}, {}, {}, 1.0, "beta = 1", false,
                 "beta",         alpha.band_label};
  for (const auto& w : rolling.windows) {
    alpha.periods.push_back(w.end);
    alpha.estimate.push_back(w.alpha_annualized);
    alpha.lower.push_back(w.alpha_annualized_ci_low);
    alpha.upper.push_back(w.alpha_annualized_ci_high);
    beta.estimate.push_back(w.beta);
    beta.lower.push_back(w.beta_ci_low);
    beta.upper.push_back(w.beta_ci_high);
  }
  beta.periods = alpha.periods;
  const std::string how = fmt::format(
      "Windows of {} {}s ending at each period shown, {} errors{}", rolling.window,
      period_noun(in.run), core::error_kind_name(rolling.errors),
      in.rolling_from_run ? ", stored with the run."
                          : "; computed for this page with the default window (the run was "
                            "recorded without --rolling), not part of the run.");
  s.blocks.push_back(Figure{band_chart(alpha), how});
  s.blocks.push_back(Figure{band_chart(beta), how});
}

Section provenance_section(const RunReportInput& in) {
  const auto& run = in.run;
  Section s{"Provenance", {}};
  s.blocks.push_back(Facts{{{"inputs hash", run.row.inputs_hash},
                            {"record hash", run.row.record_hash},
                            {"engine", run.row.engine_version},
                            {"recorded", run.row.created_at + " UTC"},
                            {"recomputed sample", in.reproduction}}});
  HtmlTable inputs{{"role", "series", "version", "columns", "source file", "note", "content hash"},
                   {},
                   {false, false, true, false, false, false, false},
                   "Every input version the run used (the content hash covers every value).",
                   true};
  for (const auto& i : run.inputs) {
    std::string version = fmt::format("v{}", i.version);
    if (i.latest_version != i.version) version += fmt::format(" (latest v{})", i.latest_version);
    inputs.rows.push_back(
        {i.role, i.series, version, i.columns, i.source_file, i.note, i.content_hash});
  }
  s.blocks.push_back(inputs);
  HtmlTable params{
      {"parameter", "value"}, {}, {false, false}, "Parameters, every default written out.", true};
  for (const auto& [key, value] : record::parameter_items(run.parameters))
    params.rows.push_back({key, value});
  s.blocks.push_back(params);
  s.blocks.push_back(Paragraph{"Data preparation, step by step:", false});
  s.blocks.push_back(BulletList{run.result.preparation});
  return s;
}

Section revision_section(const ShownRun& run, const ShownRun& old) {
  Section s{fmt::format("What changed since run {}", old.row.run_id), {}};
  s.blocks.push_back(Paragraph{
      fmt::format("This run revises run {} (recorded {} UTC): the same evaluation on the inputs "
                  "as they stand now.",
                  old.row.run_id, old.row.created_at),
      false});
  HtmlTable inputs{
      {"role", "series", "before", "after", "content hash after"}, {}, {}, "Inputs.", true};
  for (const auto& now : run.inputs) {
    const record::ShownInput* then = nullptr;
    for (const auto& o : old.inputs)
      if (o.role == now.role && o.series == now.series) then = &o;
    const std::string before = then ? fmt::format("v{}", then->version) : "absent";
    const std::string after = fmt::format("v{}", now.version);
    inputs.rows.push_back({now.role, now.series, before,
                           before == after ? after + " (unchanged)" : after, now.content_hash});
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
  figures.rows.push_back(row("alpha t", fixed(coefficient(old, "alpha").t_stat, 2),
                             fixed(coefficient(run, "alpha").t_stat, 2)));
  figures.rows.push_back(row("alpha p", p_value_text(coefficient(old, "alpha").p_value),
                             p_value_text(coefficient(run, "alpha").p_value)));
  figures.rows.push_back(row("beta", fixed(coefficient(old, "beta").estimate, 3),
                             fixed(coefficient(run, "beta").estimate, 3)));
  figures.rows.push_back(row("R-squared", fixed(old.result.statistics.r_squared, 3),
                             fixed(run.result.statistics.r_squared, 3)));
  figures.rows.push_back(row("periods", std::to_string(old.result.sample.observations),
                             std::to_string(run.result.sample.observations)));
  s.blocks.push_back(figures);
  return s;
}

}  // namespace

std::string describe_errors(const record::StoredStatistics& stats) {
  switch (stats.errors) {
    case core::ErrorKind::newey_west:
      return fmt::format(
          "Newey-West, {} lags, {}", stats.lags,
          stats.small_sample_factor ? "small-sample factor T/(T-k)" : "no small-sample factor");
    case core::ErrorKind::classic: return "classic (homoskedastic)";
    case core::ErrorKind::hc0: return "White HC0";
    case core::ErrorKind::hc1: return "White HC1 (HC0 x T/(T-k))";
    case core::ErrorKind::hc2: return "White HC2";
    case core::ErrorKind::hc3: return "White HC3";
  }
  return "";
}

std::string run_report(const RunReportInput& in) {
  const auto& run = in.run;
  const auto& sample = run.result.sample;
  const std::string unit = period_noun(run);
  const std::string frequency = core::frequency_name(sample.frequency);
  Page page;
  page.title =
      fmt::format("Run {}: {} against {}", run.row.run_id, run.row.strategy, run.row.benchmark);
  const auto& alpha = coefficient(run, "alpha");
  const auto& beta = coefficient(run, "beta");
  page.subtitle = fmt::format("alpha {} a year (t {}, p {}), beta {}, {} {} periods",
                              core::signed_percent(annual_alpha(run).estimate),
                              fixed(alpha.t_stat, 2), p_value_text(alpha.p_value),
                              fixed(beta.estimate, 3), sample.observations, frequency);
  page.facts.items = {
      {"strategy", run.row.strategy},
      {"benchmark", run.row.benchmark},
      {"risk-free rate", run.row.rate},
      {"factors", run.row.factors ? *run.row.factors : "none (single-index model)"},
      {"sample", fmt::format("{} to {}, {} periods ({} dropped)", sample.first, sample.last,
                             sample.observations, sample.dropped)},
      {"frequency", frequency},
      {"standard errors", describe_errors(run.result.statistics)},
      {"inputs hash", run.row.inputs_hash},
  };
  if (run.row.study) page.facts.items.push_back({"study", *run.row.study});
  if (run.row.note) page.facts.items.push_back({"note", *run.row.note});

  const auto& d = in.data;
  Section fit{"The fit", {}};
  ScatterInput scatter{"scatter",
                       "Strategy against benchmark, excess returns",
                       d.benchmark_excess,
                       d.strategy_excess,
                       alpha.estimate,
                       beta.estimate,
                       unit};
  fit.blocks.push_back(Figure{
      scatter_chart(scatter),
      fmt::format("One dot per {} ({} dots): excess returns over the risk-free rate, % per {}. "
                  "The line is alpha + beta x{}; the marked point on the vertical axis is alpha.",
                  unit, d.strategy_excess.size(), unit,
                  run.row.factors ? " with the factors at zero" : "")});
  fit.blocks.push_back(coefficient_table(run));
  fit.blocks.push_back(statistics_facts(run));

  Section reading{"Reading", {}};
  std::vector<std::string> sentences;
  for (const auto& r : run.result.reading)
    if (!is_caution(r)) sentences.push_back(r);  // cautions get their own box
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
                   {{run.row.strategy, strategy_growth},
                    {run.row.benchmark, growth(benchmark_total)},
                    {"risk-free", growth(d.risk_free)}},
                   "value of 1 unit invested at the start",
                   1.0};
  money.blocks.push_back(Figure{
      lines_chart(lines),
      fmt::format("Compounded {} returns over the aligned sample, {} to {}; no costs or fees "
                  "beyond those in the series.",
                  frequency, sample.first, sample.last)});
  money.blocks.push_back(Figure{
      drawdown_chart({"drawdown", "Strategy drawdown", d.periods, drawdown(strategy_growth)}),
      "Fall from the previous peak of the strategy's growth of one unit, %."});

  Section residuals{"Residuals", {}};
  residuals.blocks.push_back(Figure{
      histogram_chart({"residuals", "Distribution of residuals", d.residuals, true,
                       fmt::format("residual, % per {}", unit)}),
      "Bars: residuals of the regression binned; curve: the normal density with their mean and "
      "standard deviation, scaled to counts. Fat tails or skew weaken classic errors."});

  page.sections = {fit,
                   reading,
                   rolling,
                   money,
                   residuals,
                   cautions_section(run.result.warnings),
                   provenance_section(in)};
  if (in.revised) page.sections.push_back(revision_section(run, *in.revised));
  page.footer = in.made_by;
  return render_page(page);
}

std::string strategy_report(const StrategyReportInput& in) {
  Page page;
  page.title = fmt::format("Strategy {}: history of its runs", in.strategy);
  const std::size_t revisions =
      static_cast<std::size_t>(std::count_if(in.runs.begin(), in.runs.end(), [](const ShownRun& r) {
        return r.row.revises_run_id.has_value();
      }));
  page.subtitle = fmt::format("{} run{}, {} of them revisions; {} version{} of the series",
                              in.runs.size(), in.runs.size() == 1 ? "" : "s", revisions,
                              in.versions.size(), in.versions.size() == 1 ? "" : "s");
  if (!in.runs.empty())
    page.facts.items = {{"first run", in.runs.front().row.created_at + " UTC"},
                        {"latest run", in.runs.back().row.created_at + " UTC"}};

  IntervalsInput chart{
      "history", "Alpha per run, annualized, with its interval", {}, true, "alpha, % a year"};
  HtmlTable table{{"run", "recorded (UTC)", "errors", "periods", "alpha a year", "interval", "t",
                   "beta", "revises", "input versions"},
                  {},
                  {true, false, false, true, true, true, true, true, true, false},
                  "Every run of the strategy, oldest first."};
  for (const auto& run : in.runs) {
    const AnnualAlpha a = annual_alpha(run);
    const bool revision = run.row.revises_run_id.has_value();
    chart.items.push_back({run_label(run), a.estimate, a.low, a.high, revision});
    table.rows.push_back(
        {std::to_string(run.row.run_id), run.row.created_at, short_errors(run.result.statistics),
         std::to_string(run.result.sample.observations), core::signed_percent(a.estimate),
         fmt::format("{} to {}", core::signed_percent(a.low), core::signed_percent(a.high)),
         fixed(coefficient(run, "alpha").t_stat, 2), fixed(coefficient(run, "beta").estimate, 3),
         revision ? fmt::format("run {}", *run.row.revises_run_id) : "", versions_used(run)});
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
    chart.labels.push_back(fmt::format("{} {}", run.row.run_id, run.row.strategy));
    t_stats.push_back(coefficient(run, "alpha").t_stat);
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
    table.rows.push_back(
        {std::to_string(++rank), std::to_string(run.row.run_id), run.row.strategy,
         run.row.created_at, core::signed_percent(annual_alpha(run).estimate), fixed(a.t_stat, 2),
         p_value_text(a.p_value), fixed(coefficient(run, "beta").estimate, 3),
         std::to_string(run.result.sample.observations), short_errors(run.result.statistics)});
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
