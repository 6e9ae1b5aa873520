// The charts of the HTML report, each drawn as one self-contained <svg> element in a string.
// Pure computation: no SQL, no file I/O; the caller owns the inputs and embeds the text.
//
// Every chart is <svg class="chart" data-chart="KIND" data-marks="N" viewBox="0 0 W H"
// width="100%" role="img" ...> with a <title> and a <desc> (ids "ID-title", "ID-desc"), axes
// with round ticks and unit titles, and one element with class "mark" per data mark:
//   dots (scatter), bars (ranked bars), bins (histogram), intervals (intervals) are marks;
//   a line or area series (band, lines, drawdown) is one <path class="mark series"> whatever
//   its length, with a subpath per unbroken run (a NaN breaks it) and data-points (finite
//   values drawn) and data-segments (subpaths) attributes.
// data-marks equals the number of .mark elements, so a browser test can compare the two.
// Values come in decimal (0.012 = 1.2%) and are drawn in percent unless the input says
// otherwise; NaN means a missing period and is skipped, never drawn as zero.
// Inputs whose vectors must be of one length and are not throw
// alphatrail::Error(Failure::internal) naming the chart and the lengths (a caller bug).
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

namespace alphatrail::report {

// The drawing in viewBox units: the whole chart and the margins around the plot area. The
// chart scales to its container (width 100%), so these fix proportions, not printed size.
struct Frame {
  double width = 640.0;
  double height = 360.0;
  double left = 72.0;  // y tick labels and the y axis title
  double right = 24.0;
  double top = 48.0;     // the visible title and a legend
  double bottom = 60.0;  // x tick labels and the x axis title
};

// Strategy against benchmark excess returns, one dot per period, with the fitted line.
struct ScatterInput {
  std::string id = "scatter";  // unique within the page; prefixes element ids
  std::string title;
  std::vector<double> benchmark_excess;  // per period, decimal; NaN = missing
  std::vector<double> strategy_excess;   // per period, decimal, same length
  double alpha = 0.0;                    // intercept per period, decimal
  double beta = 0.0;
  std::string period = "month";  // the unit of a period, for "% per month"
};

// Draws the dots (pairs with a NaN are skipped), the line y = alpha + beta x across the x
// range of the dots, the intercept (0, alpha) marked and labelled, and zero lines.
// Example: scatter_chart({.title = "Brindle Hollow Value", .benchmark_excess = b, ...}).
std::string scatter_chart(const ScatterInput& in, const Frame& frame = {});

// An estimate through time with its confidence bounds, e.g. rolling alpha or beta.
struct BandInput {
  std::string id = "band";
  std::string title;
  std::vector<std::string> periods;  // one label per value, e.g. "2004-06"
  std::vector<double> estimate;      // same length as periods; NaN = no estimate
  std::vector<double> lower;
  std::vector<double> upper;
  double reference = 0.0;       // 0 for alpha, 1 for beta, in the units of the values
  std::string reference_label;  // e.g. "beta = 1"; empty: the value
  bool percent = true;          // draw values x 100 (alpha); false for beta
  std::string value_title;      // e.g. "rolling alpha, % per year (annualized)"
  std::string band_label = "confidence interval";  // e.g. "95% confidence interval"
};

// Draws the shaded band, the estimate line and the reference line; a NaN estimate (or bound)
// breaks the line (or band), and a few evenly spaced period labels mark the x axis.
std::string band_chart(const BandInput& in, const Frame& frame = {});

struct NamedSeries {
  std::string name;            // e.g. "strategy", "benchmark", "risk-free"
  std::vector<double> values;  // one per period; NaN = missing
};

// Several named series over the same periods, e.g. the growth of one unit.
struct LinesInput {
  std::string id = "lines";
  std::string title;
  std::vector<std::string> periods;
  std::vector<NamedSeries> series;  // each as long as periods
  std::string value_title = "growth of 1 unit invested";
  std::optional<double> reference = 1.0;  // a horizontal line, none when empty
};

// Draws one line per series, told apart by colour and dash pattern, with a legend.
std::string lines_chart(const LinesInput& in, const Frame& frame = {});

// Drawdown from the previous peak, values <= 0 in decimal (a positive value is drawn as 0).
struct DrawdownInput {
  std::string id = "drawdown";
  std::string title;
  std::vector<std::string> periods;
  std::vector<double> drawdown;  // same length as periods; NaN = missing
};

// Draws the area between 0 and the drawdown, y from the worst value (in %) to 0, and labels
// the worst point.
std::string drawdown_chart(const DrawdownInput& in, const Frame& frame = {});

// Histogram bins: bin i covers [low + i width, low + (i + 1) width), the last one closed.
struct Bins {
  double low = 0.0;
  double width = 1.0;
  std::vector<int> counts;
  std::string rule;  // "Freedman-Diaconis", "Sturges", "equal values" or "no values"
};

// Bins the finite values by the Freedman-Diaconis rule, width 2 IQR n^(-1/3) (Freedman and
// Diaconis, "On the histogram as a density estimator: L2 theory", Z. Wahrscheinlichkeitstheorie
// 57, 1981), falling back to Sturges' ceil(log2 n) + 1 bins (Sturges, "The choice of a class
// interval", JASA 21, 1926) when the IQR is 0; at most 60 bins. Equal values give one bin of
// width 10% of |v| (0.001 at 0) centred on v; no finite value gives no bin.
// Example: bin_values({1, 2, 2, 3}).counts sums to 4.
Bins bin_values(const std::vector<double>& values);

struct HistogramInput {
  std::string id = "histogram";
  std::string title;
  std::vector<double> residuals;  // regression residuals per period, decimal; NaN skipped
  bool percent = true;
  std::string value_title = "residual, % per month";
};

// Draws the bins (see bin_values) and the normal density with the residuals' mean and
// standard deviation, scaled to counts (n x bin width x density).
std::string histogram_chart(const HistogramInput& in, const Frame& frame = {});

// One run's estimate with its confidence interval.
struct IntervalItem {
  std::string label;  // e.g. the run id "run 12"
  double estimate = 0.0;
  double lower = 0.0;
  double upper = 0.0;
  bool revision = false;  // a re-run after the data were revised: a distinct marker
};

struct IntervalsInput {
  std::string id = "intervals";
  std::string title;
  std::vector<IntervalItem> items;  // in time order, drawn top to bottom
  bool percent = true;
  std::string value_title = "alpha, % per year (annualized)";
};

// Draws one row per item, point and interval, with a zero line; the height grows with the
// number of items (frame.height is ignored). An item with a NaN estimate keeps its row and
// label but has no mark.
std::string intervals_chart(const IntervalsInput& in, const Frame& frame = {});

// The t statistics of a study's variants, as bars from the largest down.
struct RankedInput {
  std::string id = "ranked";
  std::string title;
  std::vector<std::string> labels;  // one per variant
  std::vector<double> t_stats;      // same length; NaN = no estimate, not drawn
  std::size_t trials = 0;           // variants tried; 0 means labels.size()
  double hurdle = 3.0;              // Harvey, Liu and Zhu, "... and the Cross-Section of
                                    // Expected Returns", Review of Financial Studies 29, 2016
  double conventional = 1.96;       // two-sided 5% under the normal, drawn lighter
  std::string value_title = "t statistic of alpha";
};

// Returns the indices of the finite values, largest first, ties in input order.
// Example: ranked_order({1, NAN, 3, 1}) == {2, 0, 3}.
std::vector<std::size_t> ranked_order(const std::vector<double>& values);

// Draws the bars in ranked order (bars at or above the hurdle dark, the others light),
// labelled lines at t = hurdle and t = conventional, and states the number of trials in the
// title. Variant labels longer than 12 characters are shortened under the bars (the full
// label is in the bar's data-label).
std::string ranked_bars_chart(const RankedInput& in, const Frame& frame = {});

}  // namespace alphatrail::report
