// Differences between two versions of a column: periods added, removed and changed, the
// largest changes first. Pure computation.
#pragma once

#include <string>
#include <vector>

#include "core/series_file.h"

namespace alphatrail::core {

struct ValueChange {
  Day date = 0;
  double before = 0;  // NaN: was missing
  double after = 0;   // NaN: is missing
};

struct ColumnDiff {
  std::string column;
  std::vector<Day> added;            // dates only in the newer version
  std::vector<Day> removed;          // dates only in the older version
  std::vector<ValueChange> changed;  // same date, different value; largest |change| first
  bool empty() const { return added.empty() && removed.empty() && changed.empty(); }
};

// Compares two versions of a column date by date; a change to or from missing counts as a
// change and sorts first. Example: diff_column(v1, v2).changed.front() is the largest change.
ColumnDiff diff_column(const SeriesColumn& older, const SeriesColumn& newer);

// Compares every column of two versions by name: columns of the newer version first (a new
// column is all added), then columns only the older version has (all removed).
std::vector<ColumnDiff> diff_columns(const std::vector<SeriesColumn>& older,
                                     const std::vector<SeriesColumn>& newer);

}  // namespace alphatrail::core
