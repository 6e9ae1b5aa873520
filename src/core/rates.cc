#include "core/rates.h"

#include <fmt/format.h>

#include <cctype>
#include <cmath>
#include <limits>

#include "core/error.h"

namespace alphatrail::core {

namespace {

[[noreturn]] void bad_input(const std::string& message) {
  throw Error(Failure::bad_input, message);
}

// Turns one quoted value into the annualized decimal yield the basis expects.
double annual_yield(double value, Day date, const RateConvention& c) {
  if (!std::isfinite(value))
    bad_input(fmt::format("yield on {} is infinite; fix or blank the value", format_date(date)));
  if (c.unit == RateUnit::decimal && std::fabs(value) > 1.0)
    bad_input(
        fmt::format("yield on {} is {}, above 100% as a decimal: the series is almost "
                    "surely in percent; declare the unit percent",
                    format_date(date), value));
  if (c.unit == RateUnit::percent && std::fabs(value) > 100.0)
    bad_input(fmt::format("yield on {} is {}%, above 100%; check the data and the unit",
                          format_date(date), value));
  const double decimal = c.unit == RateUnit::percent ? value / 100.0 : value;
  if (c.quote == RateQuote::yield) return decimal;
  if (c.basis == RateBasis::act360) return money_market_yield(decimal, c.bill_days);
  return bond_equivalent_yield(decimal, c.bill_days);
}

int act360_days(Frequency f, std::int64_t key, const std::int64_t* previous) {
  if (f != Frequency::daily) return period_end(f, key) - period_end(f, key - 1);
  if (previous != nullptr && key - *previous >= 1 && key - *previous <= 7)
    return static_cast<int>(key - *previous);
  return weekday(static_cast<Day>(key)) == 0 ? 3 : 1;
}

}  // namespace

Tenor parse_tenor(std::string_view text) {
  const auto malformed = [&] {
    bad_input(
        fmt::format("tenor \"{}\" is not of the form <n>D, <n>W, <n>M or <n>Y with n >= 1; "
                    "write e.g. 4W, 13W, 1M, 3M or 1Y",
                    text));
  };
  if (text.size() < 2 || text.size() > 5) malformed();
  int n = 0;
  for (std::size_t i = 0; i + 1 < text.size(); ++i) {
    if (!std::isdigit(static_cast<unsigned char>(text[i]))) malformed();
    n = n * 10 + (text[i] - '0');
  }
  if (n < 1) malformed();
  Tenor t;
  const char unit = static_cast<char>(std::toupper(static_cast<unsigned char>(text.back())));
  t.label = std::string(text.substr(0, text.size() - 1)) + unit;
  switch (unit) {
    case 'D':
      t.length_days = n;
      t.bill_days = n;
      break;
    case 'W':
      t.length_days = 7.0 * n;
      t.bill_days = 7 * n;
      break;
    case 'M':
      t.length_days = 365.25 / 12.0 * n;
      t.bill_days = static_cast<int>(std::lround(364.0 * n / 12.0));
      break;
    case 'Y':
      t.length_days = 365.25 * n;
      t.bill_days = 364 * n;
      break;
    default: malformed();
  }
  return t;
}

double nominal_period_days(Frequency f) {
  switch (f) {
    case Frequency::daily: return 1.0;
    case Frequency::weekly: return 7.0;
    case Frequency::monthly: return 365.25 / 12.0;
    case Frequency::quarterly: return 365.25 / 4.0;
  }
  return 1.0;
}

Tenor choose_tenor(const std::vector<std::string>& available, Frequency f) {
  if (available.empty())
    bad_input(
        fmt::format("no tenor to choose from for {} periods; give the rate series' "
                    "tenors (e.g. 4W, 13W)",
                    frequency_name(f)));
  const double target = nominal_period_days(f);
  std::optional<Tenor> best;
  double best_distance = 0;
  for (const std::string& label : available) {
    Tenor t = parse_tenor(label);
    const double distance = std::fabs(t.length_days - target);
    const bool closer = !best || distance < best_distance - 1e-9;
    const bool tie_shorter =
        best && std::fabs(distance - best_distance) <= 1e-9 && t.length_days < best->length_days;
    if (closer || tie_shorter) {
      best = std::move(t);
      best_distance = distance;
    }
  }
  return *best;
}

double bill_price(double discount, int days) {
  return 100.0 * (1.0 - discount * days / 360.0);
}

double bond_equivalent_yield(double discount, int days) {
  if (days < 1)
    bad_input(
        fmt::format("bank-discount yields need the days to maturity of the bill (got {}); "
                    "give the tenor of the rate series",
                    days));
  const double price = bill_price(discount, days);
  if (price <= 0.0)
    bad_input(
        fmt::format("bank discount {} over {} days gives a price of {} per 100, not a "
                    "valid bill; check the unit (percent vs decimal) and the quote",
                    discount, days, price));
  const double r = days;
  if (days <= 182) return 365.0 * discount / (360.0 - discount * r);
  // 31 CFR 356 Appendix B (from memory): a i^2 + b i + c = 0 with a = r/(2y) - 0.25, b = r/y,
  // c = (P - 100)/P, y = 365. The root (-b + sqrt(b^2 - 4ac)) / (2a) is computed in the
  // algebraically identical form -2c / (b + sqrt(b^2 - 4ac)), which stays exact as a -> 0
  // (r -> 182.5 days, where the textbook form divides 0 by 0).
  const double y = 365.0;
  const double a = r / (2.0 * y) - 0.25;
  const double b = r / y;
  const double c = (price - 100.0) / price;
  return -2.0 * c / (b + std::sqrt(b * b - 4.0 * a * c));
}

double money_market_yield(double discount, int days) {
  if (days < 1)
    bad_input(
        fmt::format("bank-discount yields need the days to maturity of the bill (got {}); "
                    "give the tenor of the rate series",
                    days));
  if (bill_price(discount, days) <= 0.0)
    bad_input(
        fmt::format("bank discount {} over {} days gives a price of zero or below; check "
                    "the unit (percent vs decimal) and the quote",
                    discount, days));
  return 360.0 * discount / (360.0 - discount * days);
}

double period_rate(double y, RateBasis basis, Frequency f, int days) {
  switch (basis) {
    case RateBasis::compound: return std::pow(1.0 + y, 1.0 / periods_per_year(f)) - 1.0;
    case RateBasis::simple: return y / periods_per_year(f);
    case RateBasis::act360: return y * days / 360.0;
  }
  return y;
}

int default_max_age_days(Frequency f) {
  switch (f) {
    case Frequency::daily: return 7;
    case Frequency::weekly: return 14;
    case Frequency::monthly: return 62;
    case Frequency::quarterly: return 184;
  }
  return 7;
}

Day rate_as_of(Frequency f, std::int64_t key, RateTiming timing) {
  return period_end(f, timing == RateTiming::start ? key - 1 : key);
}

PeriodRates per_period_rates(const DatedSeries& yields, const RateConvention& c, Frequency f,
                             const std::vector<std::int64_t>& period_keys) {
  if (yields.dates.size() != yields.values.size())
    bad_input(fmt::format("yield series has {} dates but {} values; give one value per date",
                          yields.dates.size(), yields.values.size()));
  if (c.quote == RateQuote::discount && c.bill_days < 1)
    bad_input(
        "bank-discount yields need the days to maturity of the bill; give the tenor of "
        "the rate series");
  std::vector<double> annual(yields.values.size(), std::numeric_limits<double>::quiet_NaN());
  for (std::size_t i = 0; i < yields.dates.size(); ++i) {
    if (i > 0 && yields.dates[i] <= yields.dates[i - 1])
      bad_input(fmt::format(
          "yield series: date {} {} {}; sort the dates and remove duplicates",
          format_date(yields.dates[i]),
          yields.dates[i] == yields.dates[i - 1] ? "appears twice after" : "comes after",
          format_date(yields.dates[i - 1])));
    if (!std::isnan(yields.values[i]))
      annual[i] = annual_yield(yields.values[i], yields.dates[i], c);
  }

  const int max_age = c.max_age_days > 0 ? c.max_age_days : default_max_age_days(f);
  PeriodRates out;
  out.series.frequency = f;
  out.series.keys = period_keys;
  out.series.values.assign(period_keys.size(), std::numeric_limits<double>::quiet_NaN());
  out.used.assign(period_keys.size(), std::nullopt);

  std::size_t next = 0;             // first observation not yet passed
  std::optional<std::size_t> last;  // last finite observation passed
  for (std::size_t k = 0; k < period_keys.size(); ++k) {
    const std::int64_t key = period_keys[k];
    if (k > 0 && key <= period_keys[k - 1])
      bad_input(fmt::format("rate periods must be strictly ascending: {} comes after {}",
                            period_label(f, key), period_label(f, period_keys[k - 1])));
    const Day as_of = rate_as_of(f, key, c.timing);
    while (next < yields.dates.size() && yields.dates[next] <= as_of) {
      if (!std::isnan(annual[next])) last = next;
      ++next;
    }
    if (!last) {
      out.unobserved.push_back(key);
      continue;
    }
    if (as_of - yields.dates[*last] > max_age) {
      out.stale.push_back(key);
      continue;
    }
    out.used[k] = yields.dates[*last];
    const int days = act360_days(f, key, k > 0 ? &period_keys[k - 1] : nullptr);
    out.series.values[k] = period_rate(annual[*last], c.basis, f, days);
  }
  return out;
}

}  // namespace alphatrail::core
