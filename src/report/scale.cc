#include "report/scale.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

namespace alphatrail::report {

namespace {

// Returns 10^k, exact for |k| <= 22 (every such power of ten is a double).
double power_of_ten(int k) {
  double p = 1.0;
  for (int i = 0; i < std::abs(k); ++i) p *= 10.0;
  return k >= 0 ? p : 1.0 / p;
}

// A round step, mantissa x 10^exponent with mantissa 1, 2, 2.5 or 5.
struct Step {
  double mantissa;
  int exponent;

  // Returns n * step. Dividing by an exact 10^k (rather than multiplying by an inexact 10^-k)
  // gives the double nearest the decimal value: 3 x 0.1 -> 0.3, not 0.30000000000000004.
  double times(double n) const {
    return exponent >= 0 ? n * mantissa * power_of_ten(exponent)
                         : n * mantissa / power_of_ten(-exponent);
  }
};

// Slack for floor/ceil of value / step, so a value on a tick (0.3 / 0.1 = 2.9999999999999996)
// is not pushed one step out.
constexpr double kSlack = 1e-9;

long first_index(double low, double step) {
  return std::lround(std::floor(low / step + kSlack));
}
long last_index(double high, double step) {
  return std::lround(std::ceil(high / step - kSlack));
}

Axis axis_from(double low, double high, const Step& s) {
  Axis axis;
  axis.step = s.times(1.0);
  const long first = first_index(low, axis.step);
  const long last = last_index(high, axis.step);
  for (long i = first; i <= last; ++i) {
    double tick = s.times(static_cast<double>(i));
    if (std::abs(tick) < kSlack * axis.step) tick = 0.0;
    axis.ticks.push_back(tick);
  }
  axis.low = axis.ticks.front();
  axis.high = axis.ticks.back();
  return axis;
}

}  // namespace

std::optional<Extent> finite_extent(const std::vector<double>& values) {
  std::optional<Extent> extent;
  for (double v : values) extent = widen(extent, v);
  return extent;
}

std::optional<Extent> widen(std::optional<Extent> extent, double value) {
  if (!std::isfinite(value)) return extent;
  if (!extent) return Extent{value, value};
  extent->min = std::min(extent->min, value);
  extent->max = std::max(extent->max, value);
  return extent;
}

Axis nice_axis(double data_min, double data_max, int target_ticks, bool include_zero) {
  if (!std::isfinite(data_min) || !std::isfinite(data_max)) {
    data_min = 0.0;
    data_max = 1.0;
    include_zero = false;
  }
  if (data_min > data_max) std::swap(data_min, data_max);
  if (include_zero) {
    data_min = std::min(data_min, 0.0);
    data_max = std::max(data_max, 0.0);
  }
  if (data_min == data_max) {
    // A symmetric range around a single value, so it sits in the middle of the chart.
    const double pad = data_min == 0.0 ? 1.0 : 0.1 * std::abs(data_min);
    data_min -= pad;
    data_max += pad;
  }
  const double span = data_max - data_min;
  if (!std::isfinite(span)) return nice_axis(0.0, 1.0);
  target_ticks = std::max(target_ticks, 2);

  // Candidates around the raw step span / (target - 1), scored by how far the tick count is
  // from the target, plus the share of the axis the data leave empty (x 2), plus 0.5 for a
  // 2.5 step (quarters read less easily); ties go to the larger step.
  const int base = static_cast<int>(std::floor(std::log10(span / (target_ticks - 1))));
  Step best{1.0, base};
  double best_score = INFINITY;
  for (int e = base + 1; e >= base - 1; --e) {
    for (double m : {5.0, 2.5, 2.0, 1.0}) {
      const Step s{m, e};
      const double step = s.times(1.0);
      const long first = first_index(data_min, step), last = last_index(data_max, step);
      const long count = last - first + 1;
      const double empty = 1.0 - span / (step * static_cast<double>(last - first));
      const double score = std::abs(static_cast<double>(count - target_ticks)) + 2.0 * empty +
                           (m == 2.5 ? 0.5 : 0.0) + (count < 2 ? 100.0 : 0.0);
      if (score < best_score) {
        best_score = score;
        best = s;
      }
    }
  }
  return axis_from(data_min, data_max, best);
}

Axis nice_axis(const std::optional<Extent>& extent, int target_ticks, bool include_zero) {
  if (!extent) return nice_axis(0.0, 1.0, target_ticks, false);
  return nice_axis(extent->min, extent->max, target_ticks, include_zero);
}

int tick_decimals(double step) {
  step = std::abs(step);
  if (!(step > 0.0) || !std::isfinite(step)) return 0;
  for (int d = 0; d < 15; ++d) {
    const double x = step * power_of_ten(d);
    if (std::abs(x - std::round(x)) <= 1e-6 * x) return d;
  }
  return 15;
}

std::string tick_label(double value, double step, std::string_view suffix) {
  std::string text = fmt::format("{:.{}f}", value, tick_decimals(step));
  if (text.front() == '-' && text.find_first_not_of("-0.") == std::string::npos) text.erase(0, 1);
  text += suffix;
  return text;
}

std::vector<std::string> tick_labels(const Axis& axis, std::string_view suffix) {
  std::vector<std::string> labels;
  for (double t : axis.ticks) labels.push_back(tick_label(t, axis.step, suffix));
  return labels;
}

std::vector<std::size_t> label_positions(std::size_t n, std::size_t target) {
  std::vector<std::size_t> positions;
  if (n == 0 || target == 0) return positions;
  const std::size_t every = (n + target - 1) / target;
  for (std::size_t i = 0; i < n; i += every) positions.push_back(i);
  return positions;
}

double LinearScale::map(double value) const {
  if (domain_high == domain_low) return 0.5 * (range_a + range_b);
  // std::lerp is exact at both ends: map(domain_low) == range_a, map(domain_high) == range_b.
  return std::lerp(range_a, range_b, (value - domain_low) / (domain_high - domain_low));
}

}  // namespace alphatrail::report
