#include "report/charts.h"

#include <fmt/format.h>
#include <gtest/gtest.h>

#include <cmath>
#include <regex>
#include <set>
#include <sstream>

#include "core/error.h"
#include "report/scale.h"
#include "report/svg.h"

namespace alphatrail::report {
namespace {

// The start tags of an SVG text, "<circle class=... />" without the content.
std::vector<std::string> tags(const std::string& svg) {
  std::vector<std::string> out;
  for (std::size_t at = svg.find('<'); at != std::string::npos; at = svg.find('<', at + 1)) {
    if (svg[at + 1] == '/') continue;
    out.push_back(svg.substr(at, svg.find('>', at) - at + 1));
  }
  return out;
}

// Returns an attribute value of a tag, "" when missing.
std::string attr(const std::string& tag, const std::string& name) {
  std::smatch m;
  if (std::regex_search(tag, m, std::regex(" " + name + "=\"([^\"]*)\""))) return m[1];
  return "";
}

bool has_class(const std::string& tag, const std::string& cls) {
  const std::string classes = " " + attr(tag, "class") + " ";
  return classes.find(" " + cls + " ") != std::string::npos;
}

// The tags carrying every class in a space-separated list, e.g. "mark bin".
std::vector<std::string> with_class(const std::string& svg, const std::string& classes) {
  std::vector<std::string> out;
  for (const std::string& t : tags(svg)) {
    bool all = true;
    std::istringstream words(classes);
    for (std::string c; words >> c;) all = all && has_class(t, c);
    if (all) out.push_back(t);
  }
  return out;
}

std::string root(const std::string& svg) {
  return tags(svg).front();
}

std::size_t count(const std::string& text, const std::string& needle) {
  std::size_t n = 0;
  for (std::size_t at = text.find(needle); at != std::string::npos; at = text.find(needle, at + 1))
    ++n;
  return n;
}

// data-marks on the root equals the number of .mark elements, and both equal expected.
void expect_marks(const std::string& svg, std::size_t expected) {
  EXPECT_EQ(attr(root(svg), "data-marks"), std::to_string(expected));
  EXPECT_EQ(with_class(svg, "mark").size(), expected);
}

// Output every chart must satisfy: deterministic numbers, nothing non-finite.
void expect_clean(const std::string& svg) {
  EXPECT_EQ(svg.find("nan"), std::string::npos);
  EXPECT_EQ(svg.find("inf"), std::string::npos);
  EXPECT_FALSE(std::regex_search(svg, std::regex("[\" ML]-0[\" LZ]"))) << "a -0 in the output";
  EXPECT_EQ(count(svg, "<svg"), 1u);
  EXPECT_EQ(svg.substr(svg.size() - 7), "</svg>\n");
}

// The plot area of the default frame: x 72 .. 616, y 48 (top) .. 300 (bottom).
constexpr double kLeft = 72, kRight = 616, kTop = 48, kBottom = 300;

std::vector<std::string> months(int n) {
  std::vector<std::string> out;
  for (int i = 0; i < n; ++i) out.push_back(fmt::format("{}-{:02}", 2004 + i / 12, i % 12 + 1));
  return out;
}

ScatterInput scatter_input() {
  ScatterInput in;
  in.id = "fund-a";
  in.title = "Brindle Hollow Value & Quality";
  in.benchmark_excess = {0.01, -0.02, NAN, 0.03, 0.005, 0.015};
  in.strategy_excess = {0.012, -0.015, 0.01, NAN, 0.008, 0.02};
  in.alpha = 0.005;
  in.beta = 0.8;
  return in;
}

TEST(ScatterChart, OneDotPerCompletePairAndTheRootAttributes) {
  const std::string svg = scatter_chart(scatter_input());
  expect_clean(svg);
  expect_marks(svg, 4);  // two pairs have a NaN
  const std::string r = root(svg);
  EXPECT_EQ(attr(r, "class"), "chart");
  EXPECT_EQ(attr(r, "data-chart"), "scatter");
  EXPECT_EQ(attr(r, "viewBox"), "0 0 640 360");
  EXPECT_EQ(attr(r, "width"), "100%");
  EXPECT_EQ(attr(r, "role"), "img");
  EXPECT_EQ(attr(r, "aria-labelledby"), "fund-a-title");
  EXPECT_EQ(attr(r, "font-family"), "system-ui, sans-serif");
  EXPECT_NE(svg.find("<title id=\"fund-a-title\">Brindle Hollow Value &amp; Quality</title>"),
            std::string::npos);
  EXPECT_NE(svg.find(">benchmark excess return, % per month<"), std::string::npos);
  EXPECT_NE(svg.find(">strategy excess return, % per month<"), std::string::npos);
}

TEST(ScatterChart, DotsFitLineAndInterceptSitWhereTheScalesPutThem) {
  const std::string svg = scatter_chart(scatter_input());
  // x in percent: -2, 0.5, 1, 1.5 and 0; y: -1.5, 0.8, 1.2, 2, alpha 0.5 and the line ends
  // 0.5 + 0.8 x at x = -2 and 1.5: -1.1 and 1.7.
  const Axis xa = nice_axis(-2.0, 1.5, 5, true), ya = nice_axis(-1.5, 2.0, 5, true);
  const LinearScale xs{xa.low, xa.high, kLeft, kRight}, ys{ya.low, ya.high, kBottom, kTop};
  const auto dots = with_class(svg, "mark dot");
  ASSERT_EQ(dots.size(), 4u);
  EXPECT_EQ(attr(dots[0], "cx"), number(xs.map(1.0)));
  EXPECT_EQ(attr(dots[0], "cy"), number(ys.map(1.2)));
  EXPECT_EQ(attr(dots[1], "cx"), number(xs.map(-2.0)));
  const auto fit = with_class(svg, "fit");
  ASSERT_EQ(fit.size(), 1u);
  EXPECT_EQ(attr(fit[0], "x1"), number(xs.map(-2.0)));
  EXPECT_EQ(attr(fit[0], "y1"), number(ys.map(0.5 + 0.8 * -2.0)));
  EXPECT_EQ(attr(fit[0], "x2"), number(xs.map(1.5)));
  EXPECT_EQ(attr(fit[0], "y2"), number(ys.map(0.5 + 0.8 * 1.5)));
  const auto intercept = with_class(svg, "intercept");
  ASSERT_EQ(intercept.size(), 1u);
  EXPECT_EQ(attr(intercept[0], "d").substr(0, 1 + number(xs.map(0)).size()),
            "M" + number(xs.map(0)));
  EXPECT_NE(svg.find(">alpha +0.500% per month<"), std::string::npos);
  EXPECT_EQ(with_class(svg, "zero").size(), 2u);  // horizontal and vertical zero lines
}

TEST(ScatterChart, NoCompletePairDrawsNoMarkAndSaysSo) {
  ScatterInput in;
  in.benchmark_excess = {NAN, 0.01};
  in.strategy_excess = {0.02, NAN};
  const std::string svg = scatter_chart(in);
  expect_clean(svg);
  expect_marks(svg, 0);
  EXPECT_NE(svg.find("no data to draw"), std::string::npos);
  EXPECT_TRUE(with_class(svg, "fit").empty());
}

TEST(ScatterChart, MismatchedLengthsAreACallerError) {
  ScatterInput in;
  in.benchmark_excess = {0.01, 0.02};
  in.strategy_excess = {0.01};
  EXPECT_THROW(scatter_chart(in), Error);
}

BandInput band_input() {
  BandInput in;
  in.title = "Rolling alpha, 36 months";
  in.periods = months(8);
  in.estimate = {0.02, 0.03, 0.01, NAN, 0.04, 0.05, 0.02, 0.03};
  in.lower = {-0.01, 0.0, -0.02, NAN, 0.01, 0.02, -0.01, 0.0};
  in.upper = {0.05, 0.06, 0.04, NAN, 0.07, 0.08, 0.05, 0.06};
  in.value_title = "rolling alpha, % per year (annualized)";
  return in;
}

TEST(BandChart, AMissingEstimateBreaksTheLineAndTheBandIntoTwoSegments) {
  const std::string svg = band_chart(band_input());
  expect_clean(svg);
  expect_marks(svg, 1);  // the estimate line is one mark
  const auto series = with_class(svg, "mark series");
  ASSERT_EQ(series.size(), 1u);
  EXPECT_EQ(attr(series[0], "data-segments"), "2");
  EXPECT_EQ(attr(series[0], "data-points"), "7");
  EXPECT_EQ(count(attr(series[0], "d"), "M"), 2u);
  const auto band = with_class(svg, "band");
  ASSERT_EQ(band.size(), 1u);
  EXPECT_EQ(count(attr(band[0], "d"), "M"), 2u);
  EXPECT_EQ(count(attr(band[0], "d"), "Z"), 2u);
}

TEST(BandChart, AMissingBoundBreaksOnlyTheBand) {
  BandInput in = band_input();
  in.estimate[3] = 0.02;
  in.upper[5] = NAN;
  const std::string svg = band_chart(in);
  EXPECT_EQ(attr(with_class(svg, "mark series")[0], "data-segments"), "1");
  EXPECT_EQ(count(attr(with_class(svg, "band")[0], "d"), "M"), 3u);  // 0-2, 4, 6-7
}

TEST(BandChart, ReferenceLineAndPeriodLabels) {
  const std::string svg = band_chart(band_input());
  // Values in percent -2 .. 8 with the reference 0.
  const Axis ya = nice_axis(-2.0, 8.0);
  const LinearScale ys{ya.low, ya.high, kBottom, kTop};
  const auto ref = with_class(svg, "reference");
  ASSERT_EQ(ref.size(), 1u);
  EXPECT_EQ(attr(ref[0], "data-value"), "0");
  EXPECT_EQ(attr(ref[0], "y1"), number(ys.map(0.0)));
  EXPECT_NE(svg.find(">0%<"), std::string::npos);
  // 8 periods, at most 6 labels: every second one, x at the period's index.
  EXPECT_NE(svg.find(">2004-01<"), std::string::npos);
  EXPECT_NE(svg.find(">2004-03<"), std::string::npos);
  EXPECT_EQ(svg.find(">2004-02<"), std::string::npos);
  EXPECT_NE(svg.find(">rolling alpha, % per year (annualized)<"), std::string::npos);
  // The first estimate, 2%, at x = left and y = map(2).
  const std::string d = attr(with_class(svg, "mark series")[0], "d");
  EXPECT_EQ(d.substr(0, d.find('L')), "M72 " + number(ys.map(2.0)));
}

TEST(BandChart, BetaInItsOwnUnitsWithAReferenceAtOne) {
  BandInput in;
  in.periods = months(3);
  in.estimate = {0.9, 1.1, 1.2};
  in.lower = {0.7, 0.9, 1.0};
  in.upper = {1.1, 1.3, 1.4};
  in.reference = 1.0;
  in.reference_label = "beta = 1";
  in.percent = false;
  const std::string svg = band_chart(in);
  const Axis ya = nice_axis(0.7, 1.4);
  const LinearScale ys{ya.low, ya.high, kBottom, kTop};
  const auto ref = with_class(svg, "reference");
  ASSERT_EQ(ref.size(), 1u);
  EXPECT_EQ(attr(ref[0], "y1"), number(ys.map(1.0)));
  EXPECT_NE(svg.find(">beta = 1<"), std::string::npos);
}

LinesInput growth_input() {
  LinesInput in;
  in.title = "Growth of 1";
  in.periods = months(5);
  in.series = {{"strategy", {1.0, 1.02, 1.05, 1.04, 1.08}},
               {"Alder Vale Composite", {1.0, 1.01, NAN, 1.03, 1.02}},
               {"risk-free <bills>", {1.0, 1.001, 1.002, 1.003, 1.004}}};
  return in;
}

TEST(LinesChart, OnePathPerSeriesTellApartByColourAndDash) {
  const std::string svg = lines_chart(growth_input());
  expect_clean(svg);
  expect_marks(svg, 3);
  const auto series = with_class(svg, "mark series");
  ASSERT_EQ(series.size(), 3u);
  std::set<std::string> colours, dashes;
  for (const auto& s : series) {
    colours.insert(attr(s, "stroke"));
    dashes.insert(attr(s, "stroke-dasharray"));
  }
  EXPECT_EQ(colours.size(), 3u);
  EXPECT_EQ(dashes.size(), 3u);
  EXPECT_EQ(attr(series[0], "data-points"), "5");
  EXPECT_EQ(attr(series[1], "data-points"), "4");
  EXPECT_EQ(attr(series[1], "data-segments"), "2");  // the NaN breaks the benchmark line
  EXPECT_EQ(attr(series[2], "data-series"), "risk-free &lt;bills&gt;");
  // The legend names every series.
  EXPECT_NE(svg.find(">Alder Vale Composite<"), std::string::npos);
  EXPECT_NE(svg.find(">risk-free &lt;bills&gt;<"), std::string::npos);
  EXPECT_EQ(with_class(svg, "legend").size(), 1u);
}

TEST(LinesChart, AllMissingSeriesDrawsNoPath) {
  LinesInput in = growth_input();
  in.series[1].values.assign(5, NAN);
  expect_marks(lines_chart(in), 2);
}

TEST(LinesChart, SeriesOfTheWrongLengthIsACallerError) {
  LinesInput in = growth_input();
  in.series[2].values.pop_back();
  EXPECT_THROW(lines_chart(in), Error);
}

TEST(DrawdownChart, AreaBelowZeroWithTheAxisEndingAtZero) {
  DrawdownInput in;
  in.periods = months(6);
  in.drawdown = {0.0, -0.05, -0.12, NAN, -0.03, 0.0};
  const std::string svg = drawdown_chart(in);
  expect_clean(svg);
  expect_marks(svg, 1);
  const Axis ya = nice_axis(-12.0, 0.0, 5, true);
  EXPECT_EQ(ya.high, 0.0);
  const auto zero = with_class(svg, "zero");
  ASSERT_EQ(zero.size(), 1u);
  EXPECT_EQ(attr(zero[0], "y1"), "48");  // 0 is the top of the plot
  const auto area = with_class(svg, "mark series")[0];
  EXPECT_EQ(attr(area, "data-segments"), "2");
  EXPECT_EQ(attr(area, "data-points"), "5");
  EXPECT_EQ(count(attr(area, "d"), "Z"), 2u);
  EXPECT_NE(svg.find(">worst -12.0% (2004-03)<"), std::string::npos);
  EXPECT_NE(svg.find(">" + tick_label(ya.low, ya.step) + "<"), std::string::npos);
}

TEST(DrawdownChart, NoDrawdownStillHasARangeDownToMinusOnePercent) {
  DrawdownInput in;
  in.periods = months(3);
  in.drawdown = {0.0, 0.0, 0.01};  // a positive value is drawn at 0
  const std::string svg = drawdown_chart(in);
  expect_clean(svg);
  expect_marks(svg, 1);
  EXPECT_NE(svg.find(">-1.00<"), std::string::npos);  // nice_axis(-1, 0): step 0.25
  EXPECT_EQ(attr(with_class(svg, "mark series")[0], "data-points"), "3");
}

TEST(Bins, FreedmanDiaconisOnAKnownSample) {
  // 1..8: quartiles (Hyndman-Fan 7) 2.75 and 6.25, IQR 3.5, width 2 x 3.5 / 8^(1/3) = 3.5,
  // range 7 -> 2 bins of width 3.5: [1, 4.5) holds 1-4, [4.5, 8] holds 5-8.
  const Bins b = bin_values({1, 2, 3, 4, 5, 6, 7, 8, NAN});
  EXPECT_EQ(b.rule, "Freedman-Diaconis");
  EXPECT_EQ(b.low, 1.0);
  EXPECT_EQ(b.width, 3.5);
  EXPECT_EQ(b.counts, (std::vector<int>{4, 4}));
}

TEST(Bins, SturgesWhenTheInterquartileRangeIsZero) {
  // 7 zeros and a 1: IQR 0, so ceil(log2 8) + 1 = 4 bins of width 0.25.
  const Bins b = bin_values({0, 0, 0, 0, 0, 0, 0, 1});
  EXPECT_EQ(b.rule, "Sturges");
  EXPECT_EQ(b.width, 0.25);
  EXPECT_EQ(b.counts, (std::vector<int>{7, 0, 0, 1}));
}

TEST(Bins, CountsSumToTheFiniteValues) {
  std::vector<double> v;
  for (int i = 0; i < 240; ++i) v.push_back(i % 17 == 0 ? NAN : std::sin(i * 1.3) * 0.02);
  const Bins b = bin_values(v);
  int total = 0;
  for (int c : b.counts) total += c;
  EXPECT_EQ(total, 240 - 15);  // 15 multiples of 17 below 240
  EXPECT_GE(b.counts.size(), 2u);
  EXPECT_LE(b.counts.size(), 60u);
}

TEST(Bins, EqualValuesGiveOneBinAndNoneGiveNone) {
  const Bins b = bin_values({0.01, 0.01, NAN, 0.01});
  EXPECT_EQ(b.counts, (std::vector<int>{3}));
  EXPECT_GT(b.width, 0.0);
  EXPECT_LT(b.low, 0.01);
  EXPECT_GT(b.low + b.width, 0.01);
  EXPECT_EQ(bin_values({0, 0}).counts, (std::vector<int>{2}));
  EXPECT_GT(bin_values({0, 0}).width, 0.0);
  EXPECT_TRUE(bin_values({NAN}).counts.empty());
}

TEST(HistogramChart, BinsAreMarksAndCountsAddUp) {
  HistogramInput in;
  for (int i = 0; i < 120; ++i) in.residuals.push_back(i == 7 ? NAN : std::sin(i * 0.7) * 0.03);
  const std::string svg = histogram_chart(in);
  expect_clean(svg);
  const Bins b = bin_values(in.residuals);
  expect_marks(svg, b.counts.size());
  int total = 0;
  const auto bars = with_class(svg, "mark bin");
  for (std::size_t i = 0; i < bars.size(); ++i) {
    EXPECT_EQ(attr(bars[i], "data-count"), std::to_string(b.counts[i]));
    total += std::stoi(attr(bars[i], "data-count"));
  }
  EXPECT_EQ(total, 119);
  EXPECT_EQ(with_class(svg, "density").size(), 1u);
  EXPECT_NE(svg.find("Freedman-Diaconis rule"), std::string::npos);
}

TEST(HistogramChart, EqualResidualsGiveOneBinWithoutDividingByZero) {
  HistogramInput in;
  in.residuals = {0.0, 0.0, 0.0};
  const std::string svg = histogram_chart(in);
  expect_clean(svg);
  expect_marks(svg, 1);
  EXPECT_EQ(attr(with_class(svg, "mark bin")[0], "data-count"), "3");
  EXPECT_TRUE(with_class(svg, "density").empty());  // no spread, no normal curve
}

IntervalsInput runs_input() {
  IntervalsInput in;
  in.title = "Alpha by run";
  in.items = {{"run 1", 0.04, 0.01, 0.07, false},
              {"run 4", 0.035, 0.005, 0.065, true},
              {"run 9", NAN, NAN, NAN, false},
              {"run 12", -0.01, -0.04, 0.02, false}};
  return in;
}

TEST(IntervalsChart, OneMarkPerEstimatedRunAndRevisionsDistinct) {
  const std::string svg = intervals_chart(runs_input());
  expect_clean(svg);
  expect_marks(svg, 3);
  const auto revisions = with_class(svg, "mark interval revision");
  ASSERT_EQ(revisions.size(), 1u);
  EXPECT_EQ(attr(revisions[0], "data-label"), "run 4");
  EXPECT_EQ(attr(revisions[0], "data-revision"), "true");
  // Rows in time order, the run without an estimate keeps its row.
  const std::size_t r1 = svg.find(">run 1<"), r4 = svg.find(">run 4<"),
                    r9 = svg.find(">run 9 (no estimate)<"), r12 = svg.find(">run 12<");
  ASSERT_NE(r12, std::string::npos);
  EXPECT_LT(r1, r4);
  EXPECT_LT(r4, r9);
  EXPECT_LT(r9, r12);
  // Height: top 48 + 4 rows of 24 + bottom 60.
  EXPECT_EQ(attr(root(svg), "viewBox"), "0 0 640 204");
  // The zero line at x = map(0) on the axis over -4% .. 7%.
  const auto zero = with_class(svg, "zero");
  ASSERT_EQ(zero.size(), 1u);
  const Axis xa = nice_axis(-4.0, 7.0, 5, true);
  const double plot_left = std::stod(attr(with_class(svg, "axis-line")[0], "x1"));
  const LinearScale xs{xa.low, xa.high, plot_left, kRight};
  EXPECT_EQ(attr(zero[0], "x1"), number(xs.map(0.0)));
}

TEST(RankedOrder, DescendingWithoutMissingTiesInInputOrder) {
  EXPECT_EQ(ranked_order({1, NAN, 3, 1}), (std::vector<std::size_t>{2, 0, 3}));
  EXPECT_TRUE(ranked_order({NAN}).empty());
}

RankedInput study_input() {
  RankedInput in;
  in.title = "Momentum variants";
  in.labels = {"lookback 3", "lookback 12 skip 1", "lookback 6", "lookback 24", "lookback 9"};
  in.t_stats = {1.2, 3.5, NAN, -0.4, 2.1};
  return in;
}

TEST(RankedBarsChart, BarsSortedDescendingWithTheTrialsInTheTitle) {
  const std::string svg = ranked_bars_chart(study_input());
  expect_clean(svg);
  expect_marks(svg, 4);
  const auto bars = with_class(svg, "mark bar");
  ASSERT_EQ(bars.size(), 4u);
  EXPECT_EQ(attr(bars[0], "data-label"), "lookback 12 skip 1");
  EXPECT_EQ(attr(bars[1], "data-label"), "lookback 9");
  EXPECT_EQ(attr(bars[2], "data-label"), "lookback 3");
  EXPECT_EQ(attr(bars[3], "data-label"), "lookback 24");
  for (std::size_t i = 1; i < bars.size(); ++i)
    EXPECT_GT(std::stod(attr(bars[i - 1], "data-value")), std::stod(attr(bars[i], "data-value")));
  EXPECT_EQ(attr(bars[0], "data-rank"), "1");
  EXPECT_NE(svg.find("<title id=\"ranked-title\">Momentum variants (5 trials)</title>"),
            std::string::npos);
  EXPECT_NE(svg.find("lookback 12\u2026<"), std::string::npos);  // shortened under its bar
}

TEST(RankedBarsChart, HurdleLineAtTheScalesMapOfThree) {
  const std::string svg = ranked_bars_chart(study_input());
  const Axis ya = nice_axis(-0.4, 3.5, 5, true);
  const LinearScale ys{ya.low, ya.high, kBottom, kTop};
  const auto hurdle = with_class(svg, "threshold");
  ASSERT_EQ(hurdle.size(), 2u);  // the hurdle and the conventional line
  const std::string& t3 = has_class(hurdle[0], "conventional") ? hurdle[1] : hurdle[0];
  const std::string& t196 = has_class(hurdle[0], "conventional") ? hurdle[0] : hurdle[1];
  EXPECT_EQ(attr(t3, "data-value"), "3");
  EXPECT_EQ(attr(t3, "y1"), number(ys.map(3.0)));
  EXPECT_EQ(attr(t3, "y2"), number(ys.map(3.0)));
  EXPECT_EQ(attr(t196, "y1"), number(ys.map(1.96)));
  EXPECT_NE(attr(t3, "stroke"), attr(t196, "stroke"));  // the conventional line is lighter
  EXPECT_NE(svg.find(">t = 3<"), std::string::npos);
  EXPECT_NE(svg.find(">t = 1.96<"), std::string::npos);
  // A bar's top is at map(t): the largest, 3.5, above the line; bars from map(0).
  const auto bars = with_class(svg, "mark bar");
  EXPECT_EQ(attr(bars[0], "y"), number(ys.map(3.5)));
  EXPECT_EQ(attr(bars[3], "y"), number(ys.map(0.0)));       // -0.4 hangs below zero
  EXPECT_NE(attr(bars[0], "fill"), attr(bars[1], "fill"));  // above vs below the hurdle
}

TEST(RankedBarsChart, TrialsCanExceedTheVariantsShown) {
  RankedInput in = study_input();
  in.trials = 40;
  const std::string svg = ranked_bars_chart(in);
  EXPECT_NE(svg.find(">Momentum variants (40 trials)<"), std::string::npos);
  EXPECT_NE(svg.find("40 trials, 4 with a t statistic, 1 at or above t = 3"), std::string::npos);
}

TEST(Charts, SameInputGivesTheSameBytes) {
  EXPECT_EQ(scatter_chart(scatter_input()), scatter_chart(scatter_input()));
  EXPECT_EQ(band_chart(band_input()), band_chart(band_input()));
  EXPECT_EQ(ranked_bars_chart(study_input()), ranked_bars_chart(study_input()));
}

TEST(Charts, EmptyInputsDrawAxesAndNoMarks) {
  for (const std::string& svg : {band_chart({}), lines_chart({}), drawdown_chart({}),
                                 histogram_chart({}), intervals_chart({}), ranked_bars_chart({})}) {
    expect_clean(svg);
    expect_marks(svg, 0);
    EXPECT_NE(svg.find("no data to draw"), std::string::npos);
  }
}

}  // namespace
}  // namespace alphatrail::report
