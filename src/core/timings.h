// Phase timings for developers: with ALPHATRAIL_TIMINGS set in the environment, each mark
// prints the seconds since the first mark to stderr, so a benchmark can show where a command
// spends its time (bench/README.md). Off, a mark costs one branch.
#pragma once

namespace alphatrail::core {

// Prints "timing: NAME S.SSS s" to stderr when ALPHATRAIL_TIMINGS is set; does nothing else.
// Example: mark_phase("loaded");
void mark_phase(const char* name);

}  // namespace alphatrail::core
