// Annualizing a per-period return: the two conventions a run can record, compound
// (1 + a)^P - 1 and arithmetic a P, with P periods a year. Pure computation, never throws.
#pragma once

#include <optional>
#include <string_view>

#include "core/vocabulary.h"

namespace alphatrail::core {

enum class Annualize { compound, arithmetic };  // (1 + a)^P - 1 | a * P

// The names used in options and run records.
inline constexpr auto kAnnualizations = vocabulary<Word<Annualize>>({
    {Annualize::compound, "compound"},
    {Annualize::arithmetic, "arithmetic"},
});

// Returns "compound" or "arithmetic".
inline const char* annualize_name(Annualize a) {
  return kAnnualizations.name(a);
}
// Parses "compound" or "arithmetic"; nullopt when unknown.
inline std::optional<Annualize> parse_annualize(std::string_view name) {
  return kAnnualizations.parse(name);
}

// Returns a per-period return annualized by the convention. Both rules increase with the
// return (compound above -100% a period), so interval bounds annualize the same way.
// Example: annualize(0.01, Annualize::arithmetic, 12) == 0.12.
double annualize(double per_period, Annualize a, int periods_per_year);

}  // namespace alphatrail::core
