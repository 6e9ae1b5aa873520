#include "cli/print_runs.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <iostream>
#include <set>
#include <sstream>

#include "core/evaluation.h"
#include "core/number_text.h"
#include "core/rates.h"
#include "core/reading.h"
#include "report/reports.h"
#include "store/ledger.h"

namespace alphatrail::cli {

using nlohmann::ordered_json;  // the run objects of `--format json`, keys as stored

namespace {

// Redraws one line: the bar, and the runs recorded so far; the last draw ends the line.
void draw_progress(std::size_t done, std::size_t total) {
  constexpr int kWidth = 30;
  const int filled = static_cast<int>(kWidth * done / std::max<std::size_t>(total, 1));
  std::cerr << fmt::format("\r[{}{}] {}/{} runs recorded", std::string(filled, '#'),
                           std::string(kWidth - filled, ' '), done, total)
            << (done == total ? "\n" : "") << std::flush;
}

}  // namespace

app::Progress progress_bar(bool show) {
  if (!show) return {};
  // A single run is recorded at once: no bar for it.
  return [](std::size_t done, std::size_t total) {
    if (total > 1) draw_progress(done, total);
  };
}

namespace {

using core::fixed;

std::string pct(double v, int digits = 2) {
  return core::signed_percent(v, digits);
}

// Prints the short rolling section of a run: how many windows, over which ends, and the range
// of alpha a year and beta; the windows themselves are one `show --format csv` away.
void print_rolling_text(std::ostream& out, const record::ShownRun& run,
                        const record::StoredRolling& rolling) {
  const auto window = rolling.window;
  const auto& windows = rolling.windows;
  const std::string noun = core::period_noun(run.result.sample.frequency);
  if (windows.empty()) {
    out << fmt::format(
        "  rolling estimates      none: the sample is shorter than the window of {} {}s\n\n",
        window, noun);
    return;
  }
  double alpha_low = NAN, alpha_high = NAN, beta_low = NAN, beta_high = NAN;
  int missing = 0;
  for (const auto& w : windows) {
    const double a = w.alpha_annualized;
    const double b = w.beta;
    if (std::isnan(a) || std::isnan(b)) {
      ++missing;
      continue;
    }
    alpha_low = std::isnan(alpha_low) ? a : std::min(alpha_low, a);
    alpha_high = std::isnan(alpha_high) ? a : std::max(alpha_high, a);
    beta_low = std::isnan(beta_low) ? b : std::min(beta_low, b);
    beta_high = std::isnan(beta_high) ? b : std::max(beta_high, b);
  }
  const int lags = windows.front().lags;
  out << fmt::format("  rolling estimates      {} windows of {} {}s, ending {} to {}\n",
                     windows.size(), window, noun, windows.front().end, windows.back().end);
  out << fmt::format("                         {} errors{}\n",
                     core::error_kind_name(rolling.errors),
                     rolling.errors != core::ErrorKind::newey_west ? ""
                     : rolling.auto_lags ? fmt::format(", {} lags in each window "
                                                       "(the automatic rule for {})",
                                                       lags, window)
                                         : fmt::format(", {} lags in each window", lags));
  if (missing < static_cast<int>(windows.size()))
    out << fmt::format(
        "                         alpha {} to {} a year ({}), beta {:.2f} to {:.2f}{}\n",
        pct(alpha_low), pct(alpha_high), core::annualize_name(rolling.annualize), beta_low,
        beta_high, missing > 0 ? fmt::format("; {} windows without figures", missing) : "");
  else
    out << "                         no window could be estimated (see the warnings)\n";
  out << fmt::format(
      "                         one row per window: `alphatrail show {} --format csv`\n\n",
      run.row.run_id);
}

}  // namespace

void print_run_text(std::ostream& out, const record::ShownRun& run) {
  const auto& row = run.row;
  const auto& sample = run.result.sample;
  const auto& stats = run.result.statistics;
  const auto& params = run.parameters;
  const std::string unit = fmt::format("per {}", core::period_noun(sample.frequency));
  out << fmt::format("Run {}: {} against {}\n", row.run_id, row.strategy, row.benchmark);
  out << fmt::format("  recorded {} (UTC), engine {}, inputs hash {}\n", row.created_at,
                     row.engine_version, row.inputs_hash);
  if (row.study) out << fmt::format("  study {}\n", *row.study);
  if (row.revises_run_id) out << fmt::format("  revises run {}\n", *row.revises_run_id);
  out << fmt::format("  risk-free {}, {} basis, yield known at the period's {}\n", row.rate,
                     core::rate_basis_name(params.rate_basis),
                     core::rate_timing_name(params.rate_timing));
  if (row.factors) out << fmt::format("  factors {}\n", *row.factors);
  out << fmt::format("  sample {} to {}: {} {} periods ({} dropped)\n", sample.first, sample.last,
                     sample.observations, core::frequency_name(sample.frequency), sample.dropped);
  out << fmt::format(
      "  standard errors {}; {:g}% intervals, Student t with {} degrees of freedom\n\n",
      report::describe_errors(stats), 100 * stats.confidence, stats.degrees_of_freedom);

  Table table;
  table.header = {"term", "estimate", "std error", "t", "p", "interval low", "interval high"};
  table.right_aligned = {false, true, true, true, true, true, true};
  for (const auto& c : run.result.coefficients)
    table.rows.push_back({c.term, fixed(c.estimate, 6), fixed(c.std_error, 6), fixed(c.t_stat, 2),
                          core::p_value_text(c.p_value), fixed(c.ci_low, 6), fixed(c.ci_high, 6)});
  std::ostringstream t;
  print_table(t, table);
  std::istringstream lines(t.str());
  for (std::string line; std::getline(lines, line);) out << "  " << line << '\n';
  out << fmt::format("  (alpha is a decimal return {}; slopes are unitless)\n\n", unit);

  out << fmt::format("  alpha annualized       {} a year ({})\n", pct(stats.alpha_annualized),
                     core::annualize_name(params.annualize));
  out << fmt::format("  R-squared              {} (adjusted {}); residual sd {} {}\n",
                     fixed(stats.r_squared, 3), fixed(stats.adj_r_squared, 3),
                     fixed(stats.residual_std, 5), unit);
  out << fmt::format("  F statistic            {} (p {}), classic\n", fixed(stats.f_stat, 2),
                     core::p_value_text(stats.f_p_value));
  out << fmt::format("  Sharpe ratio           strategy {}, benchmark {} (annualized)\n",
                     fixed(stats.sharpe_strategy, 2), fixed(stats.sharpe_benchmark, 2));
  out << fmt::format("  appraisal ratio        {} (alpha / residual sd, annualized)\n",
                     fixed(stats.appraisal_ratio, 2));
  out << fmt::format("  Treynor ratio          {} a year (mean excess return / beta)\n",
                     pct(stats.treynor_ratio));
  out << fmt::format("  tracking error         {:.2f}% a year; information ratio {} (annualized)\n",
                     100 * stats.tracking_error, fixed(stats.information_ratio, 2));
  out << fmt::format("  mean excess return     strategy {}, benchmark {} {}\n",
                     pct(stats.mean_excess_strategy, 3), pct(stats.mean_excess_benchmark, 3), unit);
  out << fmt::format(
      "  correlation            {}; up-market beta {} ({} periods), down-market beta {} ({} "
      "periods)\n\n",
      fixed(stats.correlation, 3), fixed(stats.up_market_beta, 2), stats.up_periods,
      fixed(stats.down_market_beta, 2), stats.down_periods);
  if (run.result.rolling) print_rolling_text(out, run, *run.result.rolling);
  for (const auto& w : run.result.warnings) out << "  warning: " << w << '\n';
  if (!run.result.warnings.empty()) out << '\n';
  out << "  Reading\n";
  for (const auto& sentence : run.result.reading) out << "  - " << sentence << '\n';
  out << '\n';
}

void print_runs(std::ostream& out, store::Ledger& ledger, const std::vector<std::int64_t>& runs,
                Format format) {
  if (format == Format::json) {
    ordered_json array = ordered_json::array();
    for (auto id : runs) array.push_back(ledger.load_run(id));
    print_json(out, array);
    return;
  }
  if (format == Format::table && runs.size() <= 3) {
    for (auto id : runs) print_run_text(out, ledger.load_run_record(id));
    return;
  }
  // Many runs: one line each, read in one query (runs of one command have consecutive ids).
  Table table;
  table.header = {"run",  "strategy", "periods", "alpha (per period)", "alpha a year", "t", "p",
                  "beta", "R2",       "errors"};
  table.right_aligned = {true, false, true, true, true, true, true, true, true, false};
  store::RunFilter filter;
  filter.staleness = false;  // runs just recorded are not stale, and the table has no column for it
  if (!runs.empty()) {
    filter.first_run = *std::min_element(runs.begin(), runs.end());
    filter.last_run = *std::max_element(runs.begin(), runs.end());
  }
  const std::set<std::int64_t> wanted(runs.begin(), runs.end());
  const auto number = [](double v, int digits) {
    return std::isnan(v) ? std::string("n/a") : fmt::format("{:.{}f}", v, digits);
  };
  const auto summaries = runs.empty() ? std::vector<store::RunSummary>{} : ledger.list_runs(filter);
  for (const auto& r : summaries) {
    if (wanted.count(r.run_id) == 0) continue;
    table.rows.push_back(
        {std::to_string(r.run_id), r.strategy, std::to_string(r.observations), number(r.alpha, 6),
         std::isnan(r.alpha_annualized) ? "n/a" : fmt::format("{:+.2f}%", 100 * r.alpha_annualized),
         number(r.alpha_t, 2),
         std::isnan(r.alpha_p) ? "n/a"
         : r.alpha_p < 0.0001  ? "<0.0001"
                               : fmt::format("{:.4f}", r.alpha_p),
         number(r.beta, 3), number(r.r_squared, 3),
         r.errors + (r.errors == "newey-west" ? fmt::format(" ({} lags)", r.lags) : "")});
  }
  if (format == Format::csv) {
    print_csv(out, table);
    return;
  }
  print_table(out, table);
  out << fmt::format("\n{} runs recorded; `alphatrail show RUN` prints one in full.\n",
                     runs.size());
  for (const auto& c : core::standard_cautions()) out << c << '\n';
}

}  // namespace alphatrail::cli
