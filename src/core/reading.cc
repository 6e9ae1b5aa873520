#include "core/reading.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "core/evaluation.h"
#include "core/model.h"
#include "core/number_text.h"

namespace alphatrail::core {

const std::vector<std::string>& standard_cautions() {
  static const std::vector<std::string> cautions{
      "These are statistical estimates from past data, not investment advice.",
      "Survivorship bias, look-ahead bias, short samples and many tried variants all overstate "
      "alpha; a back-test is not a track record."};
  return cautions;
}

namespace {

std::string percent(double x, int digits = 2) {
  return signed_percent(x, digits);
}

}  // namespace

std::vector<std::string> compose_reading(const EvaluationResult& r,
                                         const EvaluationSettings& settings,
                                         const ReadingContext& context) {
  std::vector<std::string> out;
  const auto& fit = r.fit;
  const Frequency f = r.sample.frequency;
  const ModelSpec& model = r.model;
  const double beta = coefficient(fit, model, TermRole::market).estimate;
  const auto& a = coefficient(fit, model, TermRole::intercept);
  // "The factors" are the loadings by role; in the models of today they are every term after
  // alpha and beta.
  const bool factors = std::any_of(model.terms().begin(), model.terms().end(), is_factor_loading);

  // Classify beta as it is printed, so that 1.00 never reads as "more" or "less" strongly.
  const double shown = std::round(beta * 100) / 100;
  if (shown > 1)
    out.push_back(fmt::format(
        "Beta is {:.2f}: the strategy moves with the market, more strongly than the market "
        "itself (a 1% market excess return goes with about {:.2f}% in the strategy).",
        beta, beta));
  else if (shown == 1)
    out.push_back(
        fmt::format("Beta is {:.2f}: the strategy moves with the market about one for one.", beta));
  else if (shown > 0)
    out.push_back(fmt::format(
        "Beta is {:.2f}: the strategy moves with the market, less strongly than the market "
        "itself (a 1% market excess return goes with about {:.2f}% in the strategy).",
        beta, beta));
  else if (shown == 0)
    out.push_back(fmt::format("Beta is {:.2f}: the strategy hardly moves with the market at all.",
                              std::abs(beta)));
  else
    out.push_back(fmt::format(
        "Beta is {:.2f}: the strategy tends to move against the market (a 1% market excess "
        "return goes with about {:.2f}% in the strategy).",
        beta, beta));

  out.push_back(fmt::format(
      "Alpha, the return not explained by the {}, is {} per {} ({} a year, {} annualized).",
      factors ? "market and the factors" : "market", percent(a.estimate, 3), period_noun(f),
      percent(r.derived.alpha_annualized), annualize_name(settings.annualize)));

  const double level = 1.0 - settings.confidence;
  const std::string errors =
      fit.errors == ErrorKind::newey_west
          ? fmt::format("Newey-West standard errors ({} lags{})", fit.lags,
                        fit.small_sample_applied ? ", small-sample factor T/(T-k)" : "")
          : fmt::format("{} standard errors", error_kind_name(fit.errors));
  if (a.p_value < level)
    out.push_back(fmt::format(
        "With {}, alpha's t statistic is {:.2f} (p = {:.4f}): significant at the {:g}% level; "
        "the {:g}% interval runs from {} to {} per {}.",
        errors, a.t_stat, a.p_value, 100 * level, 100 * settings.confidence, percent(a.ci_low, 3),
        percent(a.ci_high, 3), period_noun(f)));
  else
    out.push_back(fmt::format(
        "With {}, alpha's t statistic is {:.2f} (p = {:.4f}): not significant at the {:g}% "
        "level; the data cannot tell this alpha from zero.",
        errors, a.t_stat, a.p_value, 100 * level));

  if (factors) {
    std::vector<std::string> loadings;
    for (std::size_t j = 0; j < model.size(); ++j) {
      if (!is_factor_loading(model.terms()[j])) continue;
      const Coefficient& c = fit.coefficients[j];
      loadings.push_back(fmt::format("{} {:.2f} (t {:.2f})", c.term, c.estimate, c.t_stat));
    }
    out.push_back(fmt::format("Factor loadings: {}.", fmt::join(loadings, ", ")));
  }

  out.push_back(fmt::format(
      "The {} explain{} {:.1f}% of the variance of the strategy's excess "
      "return (R-squared).",
      factors ? "market and the factors" : "market", factors ? "" : "s", 100 * fit.r_squared));

  out.push_back(fmt::format("The sample has {} {} periods, {} to {}.", r.sample.observations,
                            frequency_name(f), r.sample.first, r.sample.last));
  if (r.sample.observations < short_sample_threshold(f))
    out.push_back(fmt::format(
        "Caution: fewer than {} periods (three years) is a short sample; the estimate is fragile.",
        short_sample_threshold(f)));

  if (!context.study.empty() && context.study_trials > 1)
    out.push_back(fmt::format(
        "This is one of {} runs recorded in study '{}': the best of many variants looks better "
        "than it is; discount for the trials (a t statistic above 3 is a common bar for a "
        "new idea, Harvey, Liu & Zhu 2016).",
        context.study_trials, context.study));
  if (context.strategy_runs > 1)
    out.push_back(fmt::format("The ledger holds {} runs of this strategy, this one included.",
                              context.strategy_runs));
  for (const auto& c : standard_cautions()) out.push_back(c);
  return out;
}

}  // namespace alphatrail::core
