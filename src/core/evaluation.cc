#include "core/evaluation.h"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <map>

#include "core/error.h"
#include "core/parallel.h"

namespace alphatrail::core {

namespace {

Frequency source_frequency(const ReturnInput& input) {
  if (input.frequency) return *input.frequency;
  if (auto f = detect_frequency(input.data.dates)) return *f;
  throw Error(Failure::bad_input,
              fmt::format("cannot tell the frequency of '{}' from its dates (neither daily, "
                          "weekly, monthly nor quarterly); re-ingest it with regular dates",
                          input.name));
}

// Resamples one return input to the evaluation frequency, describing what was done.
Resampled resample(const ReturnInput& input, const std::string& role, Frequency target,
                   std::vector<std::string>& preparation, std::vector<std::string>& warnings) {
  const Frequency source = source_frequency(input);
  Resampled r = compound_returns(input.data, target, source);
  if (source == target)
    preparation.push_back(fmt::format("{} '{}': {} returns used as they are", role, input.name,
                                      frequency_name(source)));
  else
    preparation.push_back(fmt::format("{} '{}': {} returns compounded to {} (prod(1 + r) - 1)",
                                      role, input.name, frequency_name(source),
                                      frequency_name(target)));
  for (auto& note : describe(r.report, target))
    warnings.push_back(fmt::format("{} '{}': {}", role, input.name, note));
  return r;
}

// Sample statistics of a strategy's returns s against the benchmark's m over the aligned
// periods, with y = s - rf and x = m - rf the excess returns and a = s - m the active return.
// Two fused passes, means first and then centered sums, so each figure is computed the
// textbook two-pass way without a copy of any series; it runs for every strategy of a batch.
struct PairStatistics {
  double mean_y = NAN, sd_y = NAN;  // sample standard deviations (T - 1 in the denominator)
  double mean_x = NAN, sd_x = NAN;
  double mean_a = NAN, sd_a = NAN;
  double correlation = NAN;  // of y and x
  // Slopes of y on x with an intercept over the periods where x > 0 (up) and where x < 0
  // (down); NaN below 3 such periods.
  double up_beta = NAN, down_beta = NAN;
  int up_periods = 0, down_periods = 0;
};

// A sum kept in kLanes partial sums, period t adding to lane t % kLanes, and added up in one
// fixed order: the lanes are independent, so the processor works on several at once, and the
// result depends on nothing but the data.
constexpr std::size_t kLanes = 4;
struct LaneSum {
  std::array<double, kLanes> lane{};
  void add(std::size_t l, double v) { lane[l] += v; }
  double total() const { return (lane[0] + lane[1]) + (lane[2] + lane[3]); }
};

// Calls step(t, lane) for t = 0 .. T - 1, unrolled by kLanes so the lanes stay in registers.
template <typename Step>
void over_lanes(std::size_t T, const Step& step) {
  std::size_t t = 0;
  for (; t + kLanes <= T; t += kLanes)
    for (std::size_t l = 0; l < kLanes; ++l) step(t + l, l);
  for (; t < T; ++t) step(t, t % kLanes);
}

PairStatistics pair_statistics(const std::vector<double>& s, const std::vector<double>& m,
                               const std::vector<double>& rf) {
  PairStatistics out;
  const std::size_t T = s.size();
  if (T < 2) return out;
  // Each period is weighed by 0 or 1 for the up and down slopes rather than branched on,
  // since the sign of the market's excess return is what a processor cannot predict.
  LaneSum sy, sx, sa, n_up, sx_up, sy_up, n_down, sx_down, sy_down;
  over_lanes(T, [&](std::size_t t, std::size_t l) {
    const double y = s[t] - rf[t], x = m[t] - rf[t];
    sy.add(l, y);
    sx.add(l, x);
    sa.add(l, s[t] - m[t]);
    const auto up = static_cast<double>(x > 0), down = static_cast<double>(x < 0);
    n_up.add(l, up);
    sx_up.add(l, up * x);
    sy_up.add(l, up * y);
    n_down.add(l, down);
    sx_down.add(l, down * x);
    sy_down.add(l, down * y);
  });
  const auto n = static_cast<double>(T);
  out.mean_y = sy.total() / n;
  out.mean_x = sx.total() / n;
  out.mean_a = sa.total() / n;
  const double ups = n_up.total(), downs = n_down.total();
  const double mx_up = sx_up.total() / ups, my_up = sy_up.total() / ups;
  const double mx_down = sx_down.total() / downs, my_down = sy_down.total() / downs;
  LaneSum syy, sxx, sxy, saa, sxy_up, sxx_up, sxy_down, sxx_down;
  over_lanes(T, [&](std::size_t t, std::size_t l) {
    const double y = s[t] - rf[t], x = m[t] - rf[t];
    const double dy = y - out.mean_y, dx = x - out.mean_x, da = (s[t] - m[t]) - out.mean_a;
    syy.add(l, dy * dy);
    sxx.add(l, dx * dx);
    sxy.add(l, dx * dy);
    saa.add(l, da * da);
    const auto up = static_cast<double>(x > 0), down = static_cast<double>(x < 0);
    const double dx_up = up * (x - mx_up), dx_down = down * (x - mx_down);
    sxy_up.add(l, dx_up * (y - my_up));
    sxx_up.add(l, dx_up * (x - mx_up));
    sxy_down.add(l, dx_down * (y - my_down));
    sxx_down.add(l, dx_down * (x - mx_down));
  });
  out.sd_y = std::sqrt(syy.total() / (n - 1));
  out.sd_x = std::sqrt(sxx.total() / (n - 1));
  out.sd_a = std::sqrt(saa.total() / (n - 1));
  out.correlation = sxy.total() / std::sqrt(sxx.total() * syy.total());
  out.up_periods = static_cast<int>(ups);
  out.down_periods = static_cast<int>(downs);
  if (ups >= 3 && sxx_up.total() > 0) out.up_beta = sxy_up.total() / sxx_up.total();
  if (downs >= 3 && sxx_down.total() > 0) out.down_beta = sxy_down.total() / sxx_down.total();
  return out;
}

std::string describe_rate(const RateInput& rate, const EvaluationSettings& s, Frequency f) {
  const int P = periods_per_year(f);
  std::string text = fmt::format(
      "rate '{}' tenor {}: annualized {} {}", rate.name, rate.tenor, kRateUnits.name(rate.unit),
      rate.quote == RateQuote::discount ? "bank-discount quotes" : "yields");
  if (rate.unit == RateUnit::percent) text += ", divided by 100";
  if (rate.quote == RateQuote::discount)
    text += s.rate_basis == RateBasis::act360
                ? ", turned into money-market yields 360 d / (360 - d r)"
                : ", turned into bond-equivalent yields (365 d / (360 - d r) up to half a year)";
  switch (s.rate_basis) {
    case RateBasis::compound:
      text += fmt::format(", per-{} rate (1 + y)^(1/{}) - 1", period_noun(f), P);
      break;
    case RateBasis::simple: text += fmt::format(", per-{} rate y / {}", period_noun(f), P); break;
    case RateBasis::act360:
      text += fmt::format(", per-{} rate y x days / 360", period_noun(f));
      break;
  }
  text += s.rate_timing == RateTiming::start
              ? "; each period uses the yield known at its start (the last observation at or "
                "before the end of the previous period)"
              : "; each period uses the yield observed at its end (look-ahead, by request)";
  return text;
}

}  // namespace

Frequency lowest_frequency(const std::vector<Frequency>& frequencies) {
  Frequency lowest = Frequency::daily;
  for (Frequency f : frequencies)
    if (is_finer(lowest, f)) lowest = f;
  return lowest;
}

int short_sample_threshold(Frequency f) {
  return 3 * periods_per_year(f);
}

struct Evaluator::Prepared {
  std::string name;
  Aligned aligned;
  std::vector<std::string> preparation;
  std::vector<std::string> warnings;
  std::string error;  // set when the strategy cannot be put on the frequency
  Failure failure = Failure::internal;
};

Evaluator::Evaluator(const SharedInputs& shared, Frequency frequency,
                     const EvaluationSettings& settings)
    : settings_(settings), frequency_(frequency), rate_tenor_(shared.rate.tenor) {
  auto& prep = shared_preparation_;
  auto& warn = shared_warnings_;
  Resampled bench = resample(shared.benchmark, "benchmark", frequency, prep, warn);

  RateConvention convention;
  convention.unit = shared.rate.unit;
  convention.quote = shared.rate.quote;
  convention.bill_days = parse_tenor(shared.rate.tenor).bill_days;
  convention.basis = settings.rate_basis;
  convention.timing = settings.rate_timing;
  PeriodRates rates =
      per_period_rates(shared.rate.yields, convention, frequency, bench.series.keys);
  prep.push_back(describe_rate(shared.rate, settings, frequency));
  if (!rates.unobserved.empty())
    warn.push_back(
        fmt::format("rate '{}': no yield known yet for {} of the benchmark's periods "
                    "(first {}); they are dropped",
                    shared.rate.name,
                    count_label(frequency, static_cast<std::int64_t>(rates.unobserved.size())),
                    period_label(frequency, rates.unobserved.front())));
  if (!rates.stale.empty())
    warn.push_back(fmt::format(
        "rate '{}': the last yield is too old for {} (first {}); they "
        "are dropped",
        shared.rate.name, count_label(frequency, static_cast<std::int64_t>(rates.stale.size())),
        period_label(frequency, rates.stale.front())));

  // Named as the design reads them (model.h); a factor's column is named as its term.
  std::vector<NamedSeries> inputs{{kBenchmarkColumn, std::move(bench.series)},
                                  {kRateColumn, std::move(rates.series)}};
  std::vector<std::string> factor_names;
  for (const auto& factor : shared.factors) {
    Resampled r = resample(factor, "factor", frequency, prep, warn);
    inputs.push_back({factor.name, std::move(r.series)});
    factor_names.push_back(factor.name);
  }
  model_ = ModelSpec::with_factors(factor_names);
  common_.emplace(inputs, AlignOptions{settings.from, settings.to});
}

Evaluator::Prepared Evaluator::prepare(const ReturnInput& strategy) const {
  Prepared p;
  p.name = strategy.name;
  try {
    Resampled s = resample(strategy, "strategy", frequency_, p.preparation, p.warnings);
    p.aligned = common_->align({"strategy", std::move(s.series)});
  } catch (const Error& e) {
    p.error = e.what();
    p.failure = e.kind();
  }
  return p;
}

namespace {

struct Design {
  Eigen::MatrixXd X;
  Eigen::VectorXd y;
};

// Builds the model's design (model.h: [1, r_m - r_f, factors...]) and r_s - r_f from an
// aligned sample.
Design build_design(const Aligned& a, const ModelSpec& model) {
  const auto T = static_cast<Eigen::Index>(a.keys->size());
  Design d{design_matrix(model, a), Eigen::VectorXd(T)};
  const auto& s = a.column("strategy");
  const auto& rf = a.column(kRateColumn);
  for (Eigen::Index t = 0; t < T; ++t) d.y(t) = s[t] - rf[t];
  return d;
}

// Throws Error(estimation) naming every figure of a result that is not a finite number among
// those a run must hold (NOT NULL in schema/ledger.sql: each coefficient's estimate and
// standard error, annualized alpha) and the sums they come from. Data with values far beyond
// the others (a confirmed return of 1e300) overflow the sums of squares; such a result would
// otherwise reach the ledger as NULL or infinity. Ratios that may be undefined (R-squared of a
// constant excess return, a Sharpe ratio of zero spread) stay NaN and are recorded as null.
void require_finite_figures(const OlsResult& fit, const DerivedStatistics& d) {
  std::vector<std::string> bad;
  for (const Coefficient& c : fit.coefficients) {
    if (!std::isfinite(c.estimate)) bad.push_back(c.term);
    if (!std::isfinite(c.std_error)) bad.push_back(c.term + "'s standard error");
  }
  if (!std::isfinite(d.alpha_annualized)) bad.push_back("annualized alpha");
  if (!std::isfinite(fit.residual_std)) bad.push_back("the residual standard deviation");
  if (!std::isfinite(fit.rss) || !std::isfinite(fit.tss)) bad.push_back("the sums of squares");
  if (bad.empty()) return;
  throw Error(Failure::cannot_estimate,
              fmt::format("cannot estimate: not a finite number: {} (the data hold values too "
                          "large to compute with; check the returns for values far beyond the "
                          "others)",
                          fmt::join(bad, ", ")));
}

}  // namespace

EvaluationResult Evaluator::finish(Prepared&& p, OlsResult&& fit, bool keep_series) const {
  EvaluationResult r;
  r.strategy = p.name;
  r.rate_tenor = rate_tenor_;
  r.model = model_;
  const Aligned& a = p.aligned;
  const Frequency f = frequency_;
  const int P = periods_per_year(f);

  auto& sample = r.sample;
  sample.frequency = f;
  const std::vector<std::int64_t>& keys = *a.keys;
  sample.first = period_label(f, keys.front());
  sample.last = period_label(f, keys.back());
  sample.observations = static_cast<int>(keys.size());
  sample.dropped = a.report.dropped;
  sample.dropped_by_reason = a.report.dropped_by_reason;
  for (const auto& gap : a.report.gaps) sample.gaps.push_back(gap.text);
  sample.preparation = shared_preparation_;
  sample.preparation.insert(sample.preparation.end(), p.preparation.begin(), p.preparation.end());
  sample.preparation.push_back(
      fmt::format("aligned by {} on the periods where every input has a value: {} kept, {} dropped",
                  f == Frequency::daily ? "exact date" : fmt::format("calendar {}", period_noun(f)),
                  keys.size(), a.report.dropped.size()));
  sample.warnings = shared_warnings_;
  sample.warnings.insert(sample.warnings.end(), p.warnings.begin(), p.warnings.end());
  if (sample.observations < short_sample_threshold(f))
    sample.warnings.push_back(fmt::format(
        "short sample: {} {} periods, fewer than {} (three years); alpha estimates this short "
        "are unreliable",
        sample.observations, frequency_name(f), short_sample_threshold(f)));
  for (const auto& gap : sample.gaps) sample.warnings.push_back("gap inside the sample: " + gap);

  const auto& s = a.column("strategy");
  const auto& m = a.column("benchmark");
  const auto& rf = a.column("rate");
  const PairStatistics st = pair_statistics(s, m, rf);

  auto& d = r.derived;
  d.periods_per_year = P;
  const double alpha = coefficient(fit, model_, TermRole::intercept).estimate;
  const double beta = coefficient(fit, model_, TermRole::market).estimate;
  const double root_p = std::sqrt(static_cast<double>(P));
  d.alpha_annualized = annualize(alpha, settings_.annualize, P);
  d.appraisal_ratio = alpha / fit.residual_std * root_p;
  d.mean_excess_strategy = st.mean_y;
  d.mean_excess_benchmark = st.mean_x;
  d.sharpe_strategy = st.mean_y / st.sd_y * root_p;
  d.sharpe_benchmark = st.mean_x / st.sd_x * root_p;
  d.treynor_ratio = st.mean_y * P / beta;
  d.tracking_error = st.sd_a * root_p;
  d.information_ratio = st.mean_a / st.sd_a * root_p;
  d.correlation = st.correlation;
  d.up_market_beta = st.up_beta;
  d.down_market_beta = st.down_beta;
  d.up_periods = st.up_periods;
  d.down_periods = st.down_periods;
  require_finite_figures(fit, d);
  if (keep_series) {
    const std::size_t T = keys.size();
    r.keys = keys;
    r.strategy_excess.resize(T);
    r.benchmark_excess.resize(T);
    for (std::size_t t = 0; t < T; ++t) {
      r.strategy_excess[t] = s[t] - rf[t];
      r.benchmark_excess[t] = m[t] - rf[t];
    }
    r.risk_free = rf;
  } else {
    fit.residuals = {};
    fit.fitted = {};
  }

  r.fit = std::move(fit);
  r.annualize = settings_.annualize;
  if (settings_.rolling_window > 0) add_rolling(r, a);
  return r;
}

void Evaluator::add_rolling(EvaluationResult& r, const Aligned& a) const {
  const auto& c = settings_.covariance;
  const int N = settings_.rolling_window;
  r.rolling_window = N;
  r.rolling_auto_lags = c.kind == ErrorKind::newey_west && c.lags == -1;
  const Design d = build_design(a, model_);
  r.rolling =
      rolling_fits(d.X, d.y, model_, *a.keys, frequency_,
                   {N, c, settings_.confidence, settings_.annualize, periods_per_year(frequency_)});
  auto& warnings = r.sample.warnings;
  if (r.rolling.empty())
    warnings.push_back(fmt::format(
        "rolling estimates: the sample has {} periods, fewer than the window of {}; no window",
        a.keys->size(), N));
  std::size_t failed = 0;
  const RollingWindow* first_failed = nullptr;
  for (const auto& w : r.rolling)
    if (!w.problem.empty() && failed++ == 0) first_failed = &w;
  if (first_failed)
    warnings.push_back(fmt::format(
        "rolling estimates: {} of {} windows cannot be estimated and have no figures (first "
        "ending {}: {})",
        failed, r.rolling.size(), first_failed->end, first_failed->problem));
}

EvaluationResult Evaluator::evaluate(const ReturnInput& strategy) const {
  Prepared p = prepare(strategy);
  if (!p.error.empty()) throw Error(p.failure, p.error);
  const Design d = build_design(p.aligned, model_);
  OlsResult fit = fit_ols(d.X, d.y, model_.term_names(), model_.has(TermRole::intercept),
                          settings_.covariance, settings_.confidence);
  return finish(std::move(p), std::move(fit), true);
}

std::vector<Evaluator::Outcome> Evaluator::evaluate_many(const std::vector<ReturnInput>& strategies,
                                                         int threads, bool keep_series) const {
  std::vector<Outcome> outcomes(strategies.size());
  // Blocks bound the memory: each prepared strategy holds its aligned copy of every input.
  constexpr std::size_t kBlock = 128;
  for (std::size_t begin = 0; begin < strategies.size(); begin += kBlock) {
    const std::size_t end = std::min(strategies.size(), begin + kBlock);
    evaluate_block(strategies, begin, end, threads, keep_series, outcomes);
  }
  return outcomes;
}

void Evaluator::evaluate_block(const std::vector<ReturnInput>& strategies, std::size_t begin,
                               std::size_t end, int threads, bool keep_series,
                               std::vector<Outcome>& outcomes) const {
  std::vector<Prepared> prepared(end - begin);
  parallel_ranges(prepared.size(), worker_count(prepared.size(), 8, threads),
                  [&](std::size_t first, std::size_t last) {
                    for (std::size_t i = first; i < last; ++i)
                      prepared[i] = prepare(strategies[begin + i]);
                  });

  // Strategies whose kept periods are the same share a design matrix. Those aligned on the
  // common sample alone share its very key list, so most matches are a pointer comparison.
  std::vector<std::pair<SharedKeys, std::vector<std::size_t>>> groups;
  for (std::size_t i = begin; i < end; ++i) {
    if (!prepared[i - begin].error.empty()) {
      outcomes[i].error = prepared[i - begin].error;
      outcomes[i].failure = prepared[i - begin].failure;
      continue;
    }
    const SharedKeys& keys = prepared[i - begin].aligned.keys;
    auto group = std::find_if(groups.begin(), groups.end(),
                              [&](const auto& g) { return g.first == keys || *g.first == *keys; });
    if (group == groups.end()) group = groups.insert(groups.end(), {keys, {}});
    group->second.push_back(i);
  }
  // A result with figures that are not finite is that strategy's error, not the batch's.
  const auto finish_member = [&](std::size_t i, OlsResult&& fit) {
    try {
      outcomes[i].result = finish(std::move(prepared[i - begin]), std::move(fit), keep_series);
    } catch (const Error& e) {
      outcomes[i].error = e.what();
      outcomes[i].failure = e.kind();
    }
  };
  for (const auto& group : groups) {
    const std::vector<std::size_t>& members = group.second;  // named: lambdas capture it
    const Design d = build_design(prepared[members.front() - begin].aligned, model_);
    // The excess return r_s - r_f of member j, written where the fit wants it.
    const auto response = [&](Eigen::Index j, Eigen::VectorXd& y) {
      const Aligned& a = prepared[members[static_cast<std::size_t>(j)] - begin].aligned;
      const auto& s = a.column("strategy");
      const auto& rf = a.column("rate");
      y.resize(static_cast<Eigen::Index>(s.size()));
      for (Eigen::Index t = 0; t < y.size(); ++t) y(t) = s[t] - rf[t];
    };
    std::vector<OlsResult> fits;
    try {
      fits = fit_ols_many(d.X, static_cast<Eigen::Index>(members.size()), response,
                          model_.term_names(), model_.has(TermRole::intercept),
                          settings_.covariance, settings_.confidence, threads, keep_series);
    } catch (const Error&) {
      // One column can fail where others do not (e.g. an exact fit): fit them one by one.
      for (std::size_t j = 0; j < members.size(); ++j) {
        try {
          Eigen::VectorXd y;
          response(static_cast<Eigen::Index>(j), y);
          finish_member(members[j],
                        fit_ols(d.X, y, model_.term_names(), model_.has(TermRole::intercept),
                                settings_.covariance, settings_.confidence));
        } catch (const Error& e) {
          outcomes[members[j]].error = e.what();
          outcomes[members[j]].failure = e.kind();
        }
      }
      continue;
    }
    parallel_ranges(members.size(), worker_count(members.size(), 8, threads),
                    [&](std::size_t first, std::size_t last) {
                      for (std::size_t j = first; j < last; ++j)
                        finish_member(members[j], std::move(fits[j]));
                    });
  }
}

}  // namespace alphatrail::core
