#include "core/annualize.h"

#include <cmath>

namespace alphatrail::core {

double annualize(double per_period, Annualize a, int periods_per_year) {
  return a == Annualize::compound ? std::pow(1.0 + per_period, periods_per_year) - 1.0
                                  : per_period * periods_per_year;
}

}  // namespace alphatrail::core
