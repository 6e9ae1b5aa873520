// Axis ranges, ticks and the linear map from data values to SVG pixels, for the charts of the
// HTML report. Pure computation: no SQL, no I/O, nothing here throws.
//
// Ticks are round numbers, a step of 1, 2, 2.5 or 5 x 10^k, after the idea of Heckbert, "Nice
// numbers for graph labels", Graphics Gems, 1990 (Heckbert uses 1, 2, 5; 2.5 is ours, for
// quarter steps such as 0.25). Every tick is computed as i * step from an integer i, never by
// adding steps, so labels carry no 0.1 + 0.2 noise. Missing values (NaN) are skipped; an axis
// over no value at all is [0, 1]. An axis never has zero width.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace alphatrail::report {

// A value axis: the drawn range [low, high], the tick step and the ticks, ascending, each an
// exact multiple of step with low and high among them.
struct Axis {
  double low = 0.0;
  double high = 1.0;
  double step = 0.25;
  std::vector<double> ticks;
};

// The smallest and largest finite values of some data.
struct Extent {
  double min = 0.0;
  double max = 0.0;
};

// Returns the smallest and largest finite values, skipping NaN (missing periods) and infinities;
// nullopt when there is none.
// Example: finite_extent({0.02, NAN, -0.01}) == Extent{-0.01, 0.02}.
std::optional<Extent> finite_extent(const std::vector<double>& values);

// Widens an extent to cover a value; starts one from the value when the extent is empty.
// Example: widen(Extent{1, 2}, 3) == Extent{1, 3}. Non-finite values leave it unchanged.
std::optional<Extent> widen(std::optional<Extent> extent, double value);

// Chooses an axis with about target_ticks round ticks covering [data_min, data_max].
// include_zero widens the range to contain 0. A single value v gets a symmetric range around
// it (v +- 10% of |v|, or [-1, 1] when v is 0); non-finite input gets [0, 1]. A range with
// both signs always has 0 as a tick.
// Example: nice_axis(-0.4, 3.5) -> low -1, high 4, step 1, ticks -1, 0, 1, 2, 3, 4.
Axis nice_axis(double data_min, double data_max, int target_ticks = 5, bool include_zero = false);

// Chooses an axis over the finite values of the data (see the overload above).
// Example: nice_axis(finite_extent(values)) is [0, 1] when every value is NaN.
Axis nice_axis(const std::optional<Extent>& extent, int target_ticks = 5,
               bool include_zero = false);

// Returns the fewest decimals that write every multiple of step exactly.
// Example: tick_decimals(0.25) == 2, tick_decimals(5) == 0, tick_decimals(0.002) == 3.
int tick_decimals(double step);

// Formats a tick value with the decimals its axis step needs, then the suffix; never "-0".
// Example: tick_label(0.5, 0.25) == "0.50", tick_label(-10, 5, "%") == "-10%".
std::string tick_label(double value, double step, std::string_view suffix = {});

// Returns the labels of every tick of an axis (see tick_label).
std::vector<std::string> tick_labels(const Axis& axis, std::string_view suffix = {});

// Chooses at most target evenly spaced indices out of n (0, k, 2k, ...), for category labels
// such as periods "2004-06" that cannot all be written.
// Example: label_positions(24, 6) == {0, 4, 8, 12, 16, 20}; label_positions(3, 6) == {0, 1, 2}.
std::vector<std::size_t> label_positions(std::size_t n, std::size_t target);

// Maps the data domain [domain_low, domain_high] linearly onto pixels [range_a, range_b]. The
// ends map exactly; for a y axis pass range_a = bottom and range_b = top, since SVG y grows
// downward. A zero-width domain maps everything to the middle of the range.
// Example: LinearScale{0, 10, 300, 100}.map(10) == 100.
struct LinearScale {
  double domain_low = 0.0;
  double domain_high = 1.0;
  double range_a = 0.0;
  double range_b = 1.0;

  double map(double value) const;
};

}  // namespace alphatrail::report
