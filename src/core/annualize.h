// Annualizing a per-period return: the two conventions a run can record, compound
// (1 + a)^P - 1 and arithmetic a P, with P periods a year. Pure computation, never throws.
#pragma once

#include <optional>
#include <string_view>

namespace alphatrail::core {

enum class Annualize { compound, arithmetic };  // (1 + a)^P - 1 | a * P

// Returns "compound" or "arithmetic".
const char* annualize_name(Annualize a);
// Parses "compound" or "arithmetic"; nullopt when unknown.
std::optional<Annualize> parse_annualize(std::string_view name);

// Returns a per-period return annualized by the convention. Both rules increase with the
// return (compound above -100% a period), so interval bounds annualize the same way.
// Example: annualize(0.01, Annualize::arithmetic, 12) == 0.12.
double annualize(double per_period, Annualize a, int periods_per_year);

}  // namespace alphatrail::core
