// Numbers as people read them in tables, readings and report pages: one way to write a fixed
// number of digits, a signed percentage and a p-value. A figure that is not a finite number
// (undefined, such as the t statistic of an exact fit) is written "n/a", as JSON writes null.
#pragma once

#include <string>

namespace alphatrail::core {

// Writes v with `digits` decimals. Example: fixed(0.54321, 3) is "0.543"; fixed(NaN, 3) "n/a".
std::string fixed(double v, int digits);

// Writes a decimal as a signed percentage. Example: signed_percent(0.0292) is "+2.92%".
std::string signed_percent(double v, int digits = 2);

// Writes a p-value with four decimals, or "<0.0001". Example: p_value_text(0.0011) is "0.0011".
std::string p_value_text(double p);

}  // namespace alphatrail::core
