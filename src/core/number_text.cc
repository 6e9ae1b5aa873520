#include "core/number_text.h"

#include <fmt/format.h>

#include <cmath>

namespace alphatrail::core {

std::string fixed(double v, int digits) {
  return std::isfinite(v) ? fmt::format("{:.{}f}", v, digits) : "n/a";
}

std::string signed_percent(double v, int digits) {
  return std::isfinite(v) ? fmt::format("{:+.{}f}%", 100 * v, digits) : "n/a";
}

std::string p_value_text(double p) {
  if (!std::isfinite(p)) return "n/a";
  return p < 0.0001 ? "<0.0001" : fmt::format("{:.4f}", p);
}

}  // namespace alphatrail::core
