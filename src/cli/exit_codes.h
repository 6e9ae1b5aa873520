// The process exit codes: the one table that maps each kind of failure to the code a script
// sees. `--help` prints its footer from it and a test checks the README's table against it.
#pragma once

#include <string>
#include <vector>

#include "core/error.h"

namespace alphatrail::cli {

struct ExitCodeRow {
  int code;
  std::string meaning;  // as the README's table states it
};

// Returns the exit code of a failure. Example: exit_code(Failure::not_found) is 5.
int exit_code(Failure kind);

// Returns every exit code with its meaning, 0 first, in ascending order.
const std::vector<ExitCodeRow>& exit_code_table();

// Returns the one-paragraph summary `--help` ends with.
std::string exit_code_footer();

}  // namespace alphatrail::cli
