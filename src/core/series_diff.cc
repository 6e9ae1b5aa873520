#include "core/series_diff.h"

#include <algorithm>
#include <cmath>

namespace alphatrail::core {

namespace {

// Size of a change for ordering; to or from missing is larger than any number.
double magnitude(const ValueChange& c) {
  if (std::isnan(c.before) || std::isnan(c.after)) return INFINITY;
  return std::abs(c.after - c.before);
}

bool same(double a, double b) {
  return (std::isnan(a) && std::isnan(b)) || a == b;
}

}  // namespace

ColumnDiff diff_column(const SeriesColumn& older, const SeriesColumn& newer) {
  ColumnDiff d;
  d.column = newer.name;
  std::size_t i = 0;
  std::size_t j = 0;
  while (i < older.dates.size() || j < newer.dates.size()) {
    if (j == newer.dates.size() || (i < older.dates.size() && older.dates[i] < newer.dates[j])) {
      d.removed.push_back(older.dates[i++]);
    } else if (i == older.dates.size() || newer.dates[j] < older.dates[i]) {
      d.added.push_back(newer.dates[j++]);
    } else {
      if (!same(older.values[i], newer.values[j]))
        d.changed.push_back({older.dates[i], older.values[i], newer.values[j]});
      ++i;
      ++j;
    }
  }
  std::stable_sort(
      d.changed.begin(), d.changed.end(),
      [](const ValueChange& a, const ValueChange& b) { return magnitude(a) > magnitude(b); });
  return d;
}

std::vector<ColumnDiff> diff_columns(const std::vector<SeriesColumn>& older,
                                     const std::vector<SeriesColumn>& newer) {
  const auto find = [](const std::vector<SeriesColumn>& columns, const std::string& name) {
    return std::find_if(columns.begin(), columns.end(),
                        [&](const SeriesColumn& c) { return c.name == name; });
  };
  std::vector<ColumnDiff> out;
  for (const auto& column : newer) {
    const auto match = find(older, column.name);
    out.push_back(
        diff_column(match == older.end() ? SeriesColumn{column.name, {}, {}} : *match, column));
  }
  for (const auto& column : older)
    if (find(newer, column.name) == newer.end()) {
      ColumnDiff d = diff_column(column, SeriesColumn{column.name, {}, {}});
      out.push_back(std::move(d));
    }
  return out;
}

}  // namespace alphatrail::core
