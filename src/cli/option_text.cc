#include "cli/option_text.h"

#include <fmt/format.h>

#include "core/error.h"
#include "core/text.h"

namespace alphatrail::cli {

namespace {

[[noreturn]] void refuse(std::string_view option, const core::TextProblem& problem) {
  throw Error(Failure::invalid_argument,
              fmt::format("{}: {} ({})", option, core::describe_text_problem(problem),
                          core::text_problem_fix(problem.fault)));
}

}  // namespace

void require_storable_text(std::string_view option, std::string_view value) {
  if (const auto problem = core::text_problem(value)) refuse(option, *problem);
}

void require_storable_name(std::string_view option, std::string_view value) {
  if (const auto problem = core::name_problem(value)) refuse(option, *problem);
}

}  // namespace alphatrail::cli
