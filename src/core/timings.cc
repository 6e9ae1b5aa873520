#include "core/timings.h"

#include <chrono>
#include <cstdio>
#include <cstdlib>

namespace alphatrail::core {

void mark_phase(const char* name) {
  static const bool enabled = std::getenv("ALPHATRAIL_TIMINGS") != nullptr;
  if (!enabled) return;
  static const auto first = std::chrono::steady_clock::now();
  const std::chrono::duration<double> since = std::chrono::steady_clock::now() - first;
  std::fprintf(stderr, "timing: %-32s %7.3f s\n", name, since.count());
}

}  // namespace alphatrail::core
