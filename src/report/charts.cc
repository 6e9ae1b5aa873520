#include "report/charts.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <numbers>
#include <string_view>

#include "core/error.h"
#include "report/scale.h"
#include "report/svg.h"

namespace alphatrail::report {

namespace {

// The palette, ours: five colours told apart under the common colour-vision deficiencies and
// at clearly different lightness (CIE L* about 27, 48, 59, 72, 46), each paired with its own
// dash pattern so that series stay apart in greyscale print.
struct SeriesStyle {
  const char* colour;
  const char* dash;
};
constexpr SeriesStyle kSeries[] = {
    {"#1b3f73", "none"},          // dark blue, solid
    {"#c24a1c", "7 4"},           // vermillion, dashed
    {"#2b9e83", "2 3"},           // bluish green, dotted
    {"#e8a33d", "9 3 2 3"},       // orange, dash-dot
    {"#6e6e6e", "12 3 2 3 2 3"},  // grey, dash-dot-dot
};
constexpr const char* kInk = "#222222";        // titles and labels
constexpr const char* kAxisInk = "#555555";    // axis lines, ticks, the main reference line
constexpr const char* kGrid = "#e6e6e6";       // grid lines
constexpr const char* kLight = "#9a9a9a";      // secondary reference lines
constexpr const char* kLightFill = "#c4c4c4";  // bars below the hurdle
constexpr double kRowHeight = 24.0;            // one interval per row

const SeriesStyle& style(std::size_t i) {
  return kSeries[i % std::size(kSeries)];
}

// The plot area inside the margins of a frame.
struct Plot {
  explicit Plot(const Frame& f)
      : left(f.left), top(f.top), right(f.width - f.right), bottom(f.height - f.bottom) {}
  double left, top, right, bottom;
};

using Runs = std::vector<std::vector<std::size_t>>;
using Paths = std::vector<std::vector<Point>>;

void require_length(const char* chart, const std::string& what, std::size_t got, std::size_t want) {
  if (got != want)
    throw Error(Failure::internal,
                fmt::format("{} chart: {} has {} values but {} were expected; give one value per "
                            "period or item",
                            chart, what, got, want));
}

double display(double v, bool percent) {
  return percent ? 100.0 * v : v;
}

// Splits the indices 0..n-1 into runs where present(i) holds: a missing index ends a run.
template <class Present>
Runs index_runs(std::size_t n, Present present) {
  Runs runs;
  bool open = false;
  for (std::size_t i = 0; i < n; ++i) {
    if (present(i) && !open) runs.emplace_back();
    open = present(i);
    if (open) runs.back().push_back(i);
  }
  return runs;
}

// Maps each index of each run to a point.
template <class At>
Paths points_of(const Runs& runs, At at) {
  Paths paths;
  for (const auto& run : runs) {
    paths.emplace_back();
    for (std::size_t i : run) paths.back().push_back(at(i));
  }
  return paths;
}

LinearScale index_scale(std::size_t n, const Plot& p) {
  return {0.0, n > 1 ? static_cast<double>(n - 1) : 0.0, p.left, p.right};
}

void line(SvgWriter& w, const char* cls, double x1, double y1, double x2, double y2,
          const char* colour, const char* dash = "none") {
  w.leaf("line", "class", cls, "x1", x1, "y1", y1, "x2", x2, "y2", y2, "stroke", colour,
         "stroke-dasharray", dash);
}

// Text with its baseline at (x, y), anchored "start", "middle" or "end".
void label(SvgWriter& w, const char* cls, double x, double y, const char* anchor,
           std::string_view text, const char* colour = kInk) {
  w.text("text", text, "class", cls, "x", x, "y", y, "text-anchor", anchor, "fill", colour);
}

// Text over data, with a white halo so that it stays readable above dots and lines.
void halo_label(SvgWriter& w, const char* cls, double x, double y, const char* anchor,
                std::string_view text) {
  w.text("text", text, "class", cls, "x", x, "y", y, "text-anchor", anchor, "fill", kInk, "stroke",
         "#ffffff", "stroke-width", 3.0, "paint-order", "stroke");
}

// Text turned by angle degrees (negative: counter-clockwise) around its anchor point.
void turned_label(SvgWriter& w, const char* cls, double x, double y, double angle,
                  const char* anchor, std::string_view text, double size = 12.0) {
  const std::string turn =
      fmt::format("translate({} {}) rotate({})", number(x), number(y), number(angle));
  w.text("text", text, "class", cls, "transform", turn, "text-anchor", anchor, "fill", kInk,
         "font-size", size);
}

// Starts the chart's <svg> element with its title, description and visible title.
void begin_chart(SvgWriter& w, std::string_view kind, std::size_t marks, const Frame& f,
                 const std::string& id, const std::string& title, const std::string& desc) {
  const std::string view = fmt::format("0 0 {} {}", number(f.width), number(f.height));
  w.open("svg", "xmlns", "http://www.w3.org/2000/svg", "class", "chart", "data-chart", kind,
         "data-marks", static_cast<double>(marks), "viewBox", view, "width", "100%", "role", "img",
         "aria-labelledby", id + "-title", "aria-describedby", id + "-desc", "font-family",
         "system-ui, sans-serif", "font-size", 12.0);
  w.text("title", title, "id", id + "-title");
  w.text("desc", desc, "id", id + "-desc");
  w.text("text", title, "class", "chart-title", "x", f.left, "y", 20.0, "font-size", 14.0,
         "font-weight", "600", "fill", kInk);
  if (marks == 0) label(w, "note", f.width / 2, f.height / 2, "middle", "no data to draw");
}

void draw_y_axis(SvgWriter& w, const Axis& axis, const LinearScale& ys, const Plot& p,
                 std::string_view title) {
  w.open("g", "class", "axis y");
  for (double t : axis.ticks) {
    const double y = ys.map(t);
    line(w, "grid", p.left, y, p.right, y, kGrid);
    label(w, "tick", p.left - 6, y + 4, "end", tick_label(t, axis.step), kAxisInk);
  }
  line(w, "axis-line", p.left, p.top, p.left, p.bottom, kAxisInk);
  turned_label(w, "axis-title", 16, (p.top + p.bottom) / 2, -90, "middle", title);
  w.close();
}

void draw_x_axis(SvgWriter& w, const Axis& axis, const LinearScale& xs, const Plot& p,
                 std::string_view title) {
  w.open("g", "class", "axis x");
  for (double t : axis.ticks) {
    const double x = xs.map(t);
    line(w, "grid", x, p.top, x, p.bottom, kGrid);
    label(w, "tick", x, p.bottom + 18, "middle", tick_label(t, axis.step), kAxisInk);
  }
  line(w, "axis-line", p.left, p.bottom, p.right, p.bottom, kAxisInk);
  label(w, "axis-title", (p.left + p.right) / 2, p.bottom + 40, "middle", title);
  w.close();
}

// Writes a few evenly spaced period labels under the plot.
void draw_period_axis(SvgWriter& w, const std::vector<std::string>& periods, const LinearScale& xs,
                      const Plot& p) {
  w.open("g", "class", "axis x periods");
  for (std::size_t i : label_positions(periods.size(), 6)) {
    const double x = xs.map(static_cast<double>(i));
    line(w, "tick", x, p.bottom, x, p.bottom + 4, kAxisInk);
    label(w, "tick", x, p.bottom + 18, "middle", periods[i], kAxisInk);
  }
  line(w, "axis-line", p.left, p.bottom, p.right, p.bottom, kAxisInk);
  w.close();
}

// A horizontal line across the plot at a value, labelled at its right end.
void draw_level(SvgWriter& w, const char* cls, double value, const LinearScale& ys, const Plot& p,
                const char* colour, const char* dash, const std::string& text) {
  const double y = ys.map(value);
  w.leaf("line", "class", cls, "data-value", fmt::format("{}", value), "x1", p.left, "y1", y, "x2",
         p.right, "y2", y, "stroke", colour, "stroke-dasharray", dash);
  if (!text.empty()) label(w, "level-label", p.right - 4, y - 4, "end", text, colour);
}

// A diamond centred on (x, y): the intercept, and the marker of revision runs.
std::string diamond(double x, double y, double r) {
  return path_data({{x, y - r}, {x + r, y}, {x, y + r}, {x - r, y}}, true);
}

enum class Key { line, area, dot, diamond };
struct LegendEntry {
  std::string name;
  SeriesStyle style;
  Key key;
};

// Writes the legend in one row under the title.
void draw_legend(SvgWriter& w, const Frame& f, const std::vector<LegendEntry>& entries) {
  w.open("g", "class", "legend");
  double x = f.left;
  const double y = 36.0;
  for (const LegendEntry& e : entries) {
    const char* c = e.style.colour;
    switch (e.key) {
      case Key::line:
        w.leaf("line", "x1", x, "y1", y, "x2", x + 24, "y2", y, "stroke", c, "stroke-width", 2.0,
               "stroke-dasharray", e.style.dash);
        break;
      case Key::area:
        w.leaf("rect", "x", x, "y", y - 5, "width", 24.0, "height", 10.0, "fill", c, "fill-opacity",
               0.3);
        break;
      case Key::dot: w.leaf("circle", "cx", x + 12, "cy", y, "r", 4.0, "fill", c); break;
      case Key::diamond:
        w.leaf("path", "d", diamond(x + 12, y, 5), "fill", "#ffffff", "stroke", c, "stroke-width",
               2.0);
        break;
    }
    label(w, "legend-label", x + 30, y + 4, "start", e.name);
    x += 48 + 6.5 * static_cast<double>(e.name.size());
  }
  w.close();
}

// Draws one series as one path, a subpath per run; an area run is closed along its first and
// last points, which lie on the baseline and are not counted in data-points.
void draw_series(SvgWriter& w, const std::string& name, const Paths& runs, const SeriesStyle& s,
                 bool area) {
  std::string d;
  std::size_t points = 0;
  for (const auto& r : runs) {
    d += path_data(r, area);
    points += area ? r.size() - 2 : r.size();
  }
  w.leaf("path", "class", "mark series", "data-series", name, "data-points",
         static_cast<double>(points), "data-segments", static_cast<double>(runs.size()), "d", d,
         "fill", area ? s.colour : "none", "fill-opacity", area ? 0.3 : 1.0, "stroke", s.colour,
         "stroke-width", 2.0, "stroke-dasharray", area ? "none" : s.dash, "stroke-linecap", "round",
         "stroke-linejoin", "round");
}

// A count axis from 0 whose ticks are whole numbers.
Axis count_axis(double max_count) {
  Axis axis;
  for (int target : {5, 4, 6, 3}) {
    axis = nice_axis(0.0, std::max(max_count, 4.0), target, true);
    if (tick_decimals(axis.step) == 0) break;
  }
  return axis;
}

// Linear interpolation between order statistics (Hyndman and Fan, "Sample quantiles in
// statistical packages", American Statistician 50, 1996, definition 7).
double quantile(const std::vector<double>& sorted, double q) {
  const double h = q * static_cast<double>(sorted.size() - 1);
  const auto i = static_cast<std::size_t>(std::floor(h));
  if (i + 1 >= sorted.size()) return sorted.back();
  return sorted[i] + (h - static_cast<double>(i)) * (sorted[i + 1] - sorted[i]);
}

// Shortens a label to at most max bytes (ASCII run ids and variant names) with an ellipsis.
std::string shorten(const std::string& text, std::size_t max) {
  return text.size() <= max ? text : text.substr(0, max - 1) + "\u2026";
}

}  // namespace

std::string scatter_chart(const ScatterInput& in, const Frame& f) {
  require_length("scatter", "strategy_excess", in.strategy_excess.size(),
                 in.benchmark_excess.size());
  std::vector<Point> dots;  // in percent
  std::optional<Extent> xe, ye;
  for (std::size_t i = 0; i < in.benchmark_excess.size(); ++i) {
    const double x = in.benchmark_excess[i], y = in.strategy_excess[i];
    if (!std::isfinite(x) || !std::isfinite(y)) continue;
    dots.push_back({100.0 * x, 100.0 * y});
    xe = widen(xe, dots.back().x);
    ye = widen(ye, dots.back().y);
  }
  // In percent the fitted line is y = 100 alpha + beta x.
  const double a = 100.0 * in.alpha;
  auto fit = [&](double x) { return a + in.beta * x; };
  const bool fitted = xe && std::isfinite(a) && std::isfinite(in.beta);
  if (fitted) ye = widen(widen(widen(ye, a), fit(xe->min)), fit(xe->max));
  const Axis xa = nice_axis(xe, 5, true), ya = nice_axis(ye, 5, true);
  const Plot p(f);
  const LinearScale xs{xa.low, xa.high, p.left, p.right}, ys{ya.low, ya.high, p.bottom, p.top};
  const std::string unit = fmt::format("% per {}", in.period);

  SvgWriter w;
  begin_chart(w, "scatter", dots.size(), f, in.id, in.title,
              fmt::format("{} periods; fitted line: alpha {:.2f}{}, beta {:.2f}", dots.size(), a,
                          unit, in.beta));
  draw_y_axis(w, ya, ys, p, "strategy excess return, " + unit);
  draw_x_axis(w, xa, xs, p, "benchmark excess return, " + unit);
  draw_level(w, "zero", 0.0, ys, p, kAxisInk, "none", "");
  line(w, "zero", xs.map(0.0), p.top, xs.map(0.0), p.bottom, kAxisInk);
  w.open("g", "class", "dots");
  for (const Point& d : dots)
    w.leaf("circle", "class", "mark dot", "cx", xs.map(d.x), "cy", ys.map(d.y), "r", 3.0, "fill",
           style(0).colour, "fill-opacity", 0.45, "stroke", style(0).colour);
  w.close();
  if (fitted) {
    w.leaf("line", "class", "fit", "x1", xs.map(xe->min), "y1", ys.map(fit(xe->min)), "x2",
           xs.map(xe->max), "y2", ys.map(fit(xe->max)), "stroke", style(1).colour, "stroke-width",
           2.0);
    const double x0 = xs.map(0.0), y0 = ys.map(a);
    w.leaf("path", "class", "intercept", "d", diamond(x0, y0, 6), "fill", style(3).colour, "stroke",
           kInk);
    halo_label(w, "intercept-label", x0 + 10, y0 - 8, "start",
               fmt::format("alpha {:+.3f}{}", a, unit));
  }
  return w.finish();
}

std::string band_chart(const BandInput& in, const Frame& f) {
  const std::size_t n = in.periods.size();
  require_length("band", "estimate", in.estimate.size(), n);
  require_length("band", "lower", in.lower.size(), n);
  require_length("band", "upper", in.upper.size(), n);
  const double reference = display(in.reference, in.percent);
  std::optional<Extent> ye = widen(std::nullopt, reference);
  for (const auto* s : {&in.estimate, &in.lower, &in.upper})
    for (double v : *s) ye = widen(ye, display(v, in.percent));
  const Axis ya = nice_axis(ye);
  const Plot p(f);
  const LinearScale xs = index_scale(n, p), ys{ya.low, ya.high, p.bottom, p.top};
  auto at = [&](const std::vector<double>& s, std::size_t i) {
    return Point{xs.map(static_cast<double>(i)), ys.map(display(s[i], in.percent))};
  };

  const Runs line_runs =
      index_runs(n, [&](std::size_t i) { return std::isfinite(in.estimate[i]); });
  const Runs band_runs = index_runs(n, [&](std::size_t i) {
    return std::isfinite(in.estimate[i]) && std::isfinite(in.lower[i]) &&
           std::isfinite(in.upper[i]);
  });
  std::string band;  // each run: along the upper bound, then back along the lower one
  for (const auto& run : band_runs) {
    std::vector<Point> outline;
    outline.reserve(2 * run.size());
    for (std::size_t i : run) outline.push_back(at(in.upper, i));
    for (auto it = run.rbegin(); it != run.rend(); ++it) outline.push_back(at(in.lower, *it));
    band += path_data(outline, true);
  }
  const Paths line = points_of(line_runs, [&](std::size_t i) { return at(in.estimate, i); });
  std::size_t estimates = 0;
  for (const auto& r : line_runs) estimates += r.size();
  const std::string ref_label = in.reference_label.empty()
                                    ? fmt::format("{:g}{}", reference, in.percent ? "%" : "")
                                    : in.reference_label;

  SvgWriter w;
  begin_chart(w, "band", line.empty() ? 0 : 1, f, in.id, in.title,
              fmt::format("{} periods, {} with an estimate; shaded: {}; reference line at {}", n,
                          estimates, in.band_label, ref_label));
  draw_y_axis(w, ya, ys, p, in.value_title);
  draw_period_axis(w, in.periods, xs, p);
  w.leaf("path", "class", "band", "data-segments", static_cast<double>(band_runs.size()), "d", band,
         "fill", style(0).colour, "fill-opacity", 0.18, "stroke", "none");
  draw_level(w, "reference", reference, ys, p, kAxisInk, "5 3", ref_label);
  if (!line.empty()) draw_series(w, "estimate", line, style(0), false);
  draw_legend(w, f, {{"estimate", style(0), Key::line}, {in.band_label, style(0), Key::area}});
  return w.finish();
}

std::string lines_chart(const LinesInput& in, const Frame& f) {
  const std::size_t n = in.periods.size();
  std::optional<Extent> ye;
  if (in.reference) ye = widen(ye, *in.reference);
  for (const NamedSeries& s : in.series) {
    require_length("lines", "series " + s.name, s.values.size(), n);
    for (double v : s.values) ye = widen(ye, v);
  }
  const Axis ya = nice_axis(ye);
  const Plot p(f);
  const LinearScale xs = index_scale(n, p), ys{ya.low, ya.high, p.bottom, p.top};

  std::vector<Paths> lines;
  std::vector<LegendEntry> legend;
  std::size_t marks = 0;
  for (std::size_t k = 0; k < in.series.size(); ++k) {
    const auto& v = in.series[k].values;
    const Runs runs = index_runs(n, [&](std::size_t i) { return std::isfinite(v[i]); });
    lines.push_back(points_of(runs, [&](std::size_t i) {
      return Point{xs.map(static_cast<double>(i)), ys.map(v[i])};
    }));
    if (!runs.empty()) ++marks;
    legend.push_back({in.series[k].name, style(k), Key::line});
  }

  SvgWriter w;
  begin_chart(w, "lines", marks, f, in.id, in.title,
              fmt::format("{} series over {} periods", in.series.size(), n));
  draw_y_axis(w, ya, ys, p, in.value_title);
  draw_period_axis(w, in.periods, xs, p);
  if (in.reference)
    draw_level(w, "reference", *in.reference, ys, p, kLight, "none",
               fmt::format("{:g}", *in.reference));
  for (std::size_t k = 0; k < lines.size(); ++k)
    if (!lines[k].empty()) draw_series(w, in.series[k].name, lines[k], style(k), false);
  draw_legend(w, f, legend);
  return w.finish();
}

std::string drawdown_chart(const DrawdownInput& in, const Frame& f) {
  const std::size_t n = in.periods.size();
  require_length("drawdown", "drawdown", in.drawdown.size(), n);
  auto value = [&](std::size_t i) { return 100.0 * std::min(in.drawdown[i], 0.0); };
  const Runs runs = index_runs(n, [&](std::size_t i) { return std::isfinite(in.drawdown[i]); });
  std::size_t worst = n;
  for (const auto& run : runs)
    for (std::size_t i : run)
      if (worst == n || value(i) < value(worst)) worst = i;
  // y runs from the worst drawdown to 0; with none below 0, from -1% to 0.
  const double low = worst != n && value(worst) < 0 ? value(worst) : -1.0;
  const Axis ya = nice_axis(low, 0.0, 5, true);
  const Plot p(f);
  const LinearScale xs = index_scale(n, p), ys{ya.low, ya.high, p.bottom, p.top};
  auto x_at = [&](std::size_t i) { return xs.map(static_cast<double>(i)); };

  Paths area = points_of(runs, [&](std::size_t i) { return Point{x_at(i), ys.map(value(i))}; });
  for (std::size_t r = 0; r < runs.size(); ++r) {  // close each run along the zero line
    area[r].insert(area[r].begin(), Point{x_at(runs[r].front()), ys.map(0.0)});
    area[r].push_back({x_at(runs[r].back()), ys.map(0.0)});
  }
  const std::string worst_text =
      worst == n ? "" : fmt::format("worst {:.1f}% ({})", value(worst), in.periods[worst]);

  SvgWriter w;
  begin_chart(w, "drawdown", area.empty() ? 0 : 1, f, in.id, in.title,
              fmt::format("drawdown over {} periods; {}", n, worst_text));
  draw_y_axis(w, ya, ys, p, "drawdown, % below the previous peak");
  draw_period_axis(w, in.periods, xs, p);
  if (!area.empty()) draw_series(w, "drawdown", area, style(1), true);
  draw_level(w, "zero", 0.0, ys, p, kAxisInk, "none", "");
  if (worst != n) {
    const double x = x_at(worst), y = ys.map(value(worst));
    const bool right_half = x > (p.left + p.right) / 2;
    w.leaf("circle", "class", "worst", "cx", x, "cy", y, "r", 3.5, "fill", kInk);
    halo_label(w, "worst-label", right_half ? x - 8 : x + 8, y + 4, right_half ? "end" : "start",
               worst_text);
  }
  return w.finish();
}

Bins bin_values(const std::vector<double>& values) {
  std::vector<double> x;
  for (double v : values)
    if (std::isfinite(v)) x.push_back(v);
  std::sort(x.begin(), x.end());
  if (x.empty()) return {0.0, 1.0, {}, "no values"};
  const double lo = x.front(), hi = x.back();
  const auto n = static_cast<int>(x.size());
  if (hi == lo) {
    const double width = lo == 0.0 ? 1e-3 : 0.1 * std::abs(lo);
    return {lo - width / 2, width, {n}, "equal values"};
  }
  const double iqr = quantile(x, 0.75) - quantile(x, 0.25);
  Bins bins{lo, 0.0, {}, iqr > 0.0 ? "Freedman-Diaconis" : "Sturges"};
  const double k_raw = iqr > 0.0 ? (hi - lo) / (2.0 * iqr / std::cbrt(static_cast<double>(n)))
                                 : std::log2(static_cast<double>(n)) + 1.0;
  const int k = std::clamp(static_cast<int>(std::ceil(k_raw)), 1, 60);
  bins.width = (hi - lo) / k;
  bins.counts.assign(static_cast<std::size_t>(k), 0);
  for (double v : x) {  // the maximum falls in the last bin
    const int i = static_cast<int>(std::floor((v - lo) / bins.width));
    ++bins.counts[static_cast<std::size_t>(std::clamp(i, 0, k - 1))];
  }
  return bins;
}

std::string histogram_chart(const HistogramInput& in, const Frame& f) {
  const Bins bins = bin_values(in.residuals);
  const std::size_t k = bins.counts.size();
  double n = 0.0, sum = 0.0, squares = 0.0;
  for (double v : in.residuals) {
    if (!std::isfinite(v)) continue;
    n += 1.0;
    sum += v;
  }
  const double mean = n > 0 ? sum / n : 0.0;
  for (double v : in.residuals)
    if (std::isfinite(v)) squares += (v - mean) * (v - mean);
  const double sd = n > 1 ? std::sqrt(squares / (n - 1)) : 0.0;
  // Expected count in a bin centred on x (decimal) under the normal with that mean and sd.
  auto expected = [&](double x) {
    const double z = (x - mean) / sd;
    return n * bins.width * std::exp(-0.5 * z * z) / (sd * std::sqrt(2.0 * std::numbers::pi));
  };
  const char* unit = in.percent ? "%" : "";

  const double high = bins.low + static_cast<double>(k) * bins.width;
  const Axis xa = k == 0 ? nice_axis(std::nullopt)
                         : nice_axis(display(bins.low, in.percent), display(high, in.percent));
  double top = sd > 0.0 ? expected(mean) : 0.0;
  for (int c : bins.counts) top = std::max(top, static_cast<double>(c));
  const Axis ya = count_axis(top);
  const Plot p(f);
  const LinearScale xs{xa.low, xa.high, p.left, p.right}, ys{ya.low, ya.high, p.bottom, p.top};

  SvgWriter w;
  begin_chart(w, "histogram", k, f, in.id, in.title,
              fmt::format("{} residuals in {} bins of width {:.3g}{} ({} rule); normal curve with "
                          "mean {:.3g}{} and standard deviation {:.3g}{}",
                          n, k, display(bins.width, in.percent), unit, bins.rule,
                          display(mean, in.percent), unit, display(sd, in.percent), unit));
  draw_y_axis(w, ya, ys, p, "periods per bin");
  draw_x_axis(w, xa, xs, p, in.value_title);
  w.open("g", "class", "bins");
  for (std::size_t i = 0; i < k; ++i) {
    const double edge = bins.low + static_cast<double>(i) * bins.width;
    const double x0 = xs.map(display(edge, in.percent));
    const double x1 = xs.map(display(edge + bins.width, in.percent));
    const double y = ys.map(bins.counts[i]);
    w.leaf("rect", "class", "mark bin", "data-count", static_cast<double>(bins.counts[i]), "x", x0,
           "y", y, "width", x1 - x0, "height", ys.map(0.0) - y, "fill", style(0).colour,
           "fill-opacity", 0.6, "stroke", "#ffffff");
  }
  w.close();
  if (sd > 0.0) {
    std::vector<Point> curve;
    for (int i = 0; i <= 80; ++i) {
      const double x = xa.low + (xa.high - xa.low) * i / 80.0;
      curve.push_back({xs.map(x), ys.map(expected(in.percent ? x / 100.0 : x))});
    }
    w.leaf("path", "class", "density", "d", path_data(curve), "fill", "none", "stroke",
           style(1).colour, "stroke-width", 2.0, "stroke-dasharray", style(1).dash);
  }
  draw_legend(w, f,
              {{"residuals per bin", style(0), Key::area},
               {"normal, same mean and standard deviation", style(1), Key::line}});
  return w.finish();
}

std::string intervals_chart(const IntervalsInput& in, const Frame& frame) {
  const std::size_t m = in.items.size();
  Frame f = frame;
  f.height = f.top + kRowHeight * static_cast<double>(std::max<std::size_t>(m, 1)) + f.bottom;
  std::size_t longest = 0;  // room for the longest label and " (no estimate)"
  for (const IntervalItem& item : in.items) longest = std::max(longest, item.label.size());
  f.left = std::max(f.left, 16.0 + 6.5 * static_cast<double>(longest + 14));

  std::optional<Extent> xe;
  std::size_t marks = 0;
  for (const IntervalItem& item : in.items) {
    if (!std::isfinite(item.estimate)) continue;
    ++marks;
    for (double v : {item.estimate, item.lower, item.upper}) xe = widen(xe, display(v, in.percent));
  }
  const Axis xa = nice_axis(xe, 5, true);
  const Plot p(f);
  const LinearScale xs{xa.low, xa.high, p.left, p.right};

  SvgWriter w;
  begin_chart(w, "intervals", marks, f, in.id, in.title,
              fmt::format("{} runs in time order, {} with an estimate; point estimate and "
                          "confidence interval per run",
                          m, marks));
  draw_x_axis(w, xa, xs, p, in.value_title);
  line(w, "zero", xs.map(0.0), p.top, xs.map(0.0), p.bottom, kAxisInk);
  for (std::size_t i = 0; i < m; ++i) {
    const IntervalItem& item = in.items[i];
    const double y = p.top + (static_cast<double>(i) + 0.5) * kRowHeight;
    const bool has = std::isfinite(item.estimate);
    label(w, "item-label", p.left - 8, y + 4, "end",
          has ? item.label : item.label + " (no estimate)");
    if (!has) continue;
    const char* c = style(item.revision ? 1 : 0).colour;
    w.open("g", "class", item.revision ? "mark interval revision" : "mark interval", "data-label",
           item.label, "data-revision", item.revision ? "true" : "false");
    if (std::isfinite(item.lower) && std::isfinite(item.upper))
      w.leaf("line", "x1", xs.map(display(item.lower, in.percent)), "y1", y, "x2",
             xs.map(display(item.upper, in.percent)), "y2", y, "stroke", c, "stroke-width", 2.0);
    const double x = xs.map(display(item.estimate, in.percent));
    if (item.revision)
      w.leaf("path", "d", diamond(x, y, 6), "fill", "#ffffff", "stroke", c, "stroke-width", 2.0);
    else
      w.leaf("circle", "cx", x, "cy", y, "r", 4.0, "fill", c);
    w.close();
  }
  draw_legend(w, f,
              {{"original run", style(0), Key::dot},
               {"revision run (data revised)", style(1), Key::diamond}});
  return w.finish();
}

std::vector<std::size_t> ranked_order(const std::vector<double>& values) {
  std::vector<std::size_t> order;
  for (std::size_t i = 0; i < values.size(); ++i)
    if (std::isfinite(values[i])) order.push_back(i);
  std::stable_sort(order.begin(), order.end(),
                   [&](std::size_t a, std::size_t b) { return values[a] > values[b]; });
  return order;
}

std::string ranked_bars_chart(const RankedInput& in, const Frame& f) {
  require_length("ranked bars", "t_stats", in.t_stats.size(), in.labels.size());
  const std::vector<std::size_t> order = ranked_order(in.t_stats);
  const std::size_t trials = in.trials > 0 ? in.trials : in.labels.size();
  std::optional<Extent> ye = widen(widen(std::nullopt, in.hurdle), in.conventional);
  std::size_t above = 0;
  for (std::size_t i : order) {
    ye = widen(ye, in.t_stats[i]);
    if (in.t_stats[i] >= in.hurdle) ++above;
  }
  const Axis ya = nice_axis(ye, 5, true);
  const Plot p(f);
  const LinearScale ys{ya.low, ya.high, p.bottom, p.top};
  const double slot =
      (p.right - p.left) / static_cast<double>(std::max<std::size_t>(order.size(), 1));
  const std::string title = in.title.empty() ? fmt::format("{} trials", trials)
                                             : fmt::format("{} ({} trials)", in.title, trials);

  SvgWriter w;
  begin_chart(w, "ranked-bars", order.size(), f, in.id, title,
              fmt::format("{} trials, {} with a t statistic, {} at or above t = {:g}; sorted "
                          "from the largest t statistic down",
                          trials, order.size(), above, in.hurdle));
  draw_y_axis(w, ya, ys, p, in.value_title);
  w.open("g", "class", "bars");
  for (std::size_t r = 0; r < order.size(); ++r) {
    const double t = in.t_stats[order[r]];
    const double y0 = ys.map(0.0), y1 = ys.map(t);
    w.leaf("rect", "class", "mark bar", "data-label", in.labels[order[r]], "data-rank",
           static_cast<double>(r + 1), "data-value", fmt::format("{}", t), "x",
           p.left + (static_cast<double>(r) + 0.15) * slot, "y", std::min(y0, y1), "width",
           0.7 * slot, "height", std::abs(y0 - y1), "fill",
           t >= in.hurdle ? style(0).colour : kLightFill);
  }
  w.close();
  w.open("g", "class", "axis x variants");
  for (std::size_t r : label_positions(order.size(), 30))
    turned_label(w, "tick", p.left + (static_cast<double>(r) + 0.5) * slot, p.bottom + 10, -45,
                 "end", shorten(in.labels[order[r]], 12), 10.0);
  w.close();
  draw_level(w, "zero", 0.0, ys, p, kAxisInk, "none", "");
  draw_level(w, "threshold conventional", in.conventional, ys, p, kLight, "4 3",
             fmt::format("t = {:g}", in.conventional));
  draw_level(w, "threshold", in.hurdle, ys, p, kInk, "none", fmt::format("t = {:g}", in.hurdle));
  return w.finish();
}

}  // namespace alphatrail::report
