#include "core/annualize.h"

#include <cmath>

namespace alphatrail::core {

const char* annualize_name(Annualize a) {
  return a == Annualize::compound ? "compound" : "arithmetic";
}

std::optional<Annualize> parse_annualize(std::string_view name) {
  if (name == "compound") return Annualize::compound;
  if (name == "arithmetic") return Annualize::arithmetic;
  return std::nullopt;
}

double annualize(double per_period, Annualize a, int periods_per_year) {
  return a == Annualize::compound ? std::pow(1.0 + per_period, periods_per_year) - 1.0
                                  : per_period * periods_per_year;
}

}  // namespace alphatrail::core
