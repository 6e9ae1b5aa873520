#include "core/series_diff.h"

#include <gtest/gtest.h>

#include <cmath>

namespace alphatrail::core {
namespace {

Day d(const char* text) {
  return parse_date(text).day;
}

TEST(SeriesDiff, FindsAddedRemovedAndChangedPeriodsLargestFirst) {
  const SeriesColumn v1{"b",
                        {d("2021-01-31"), d("2021-02-28"), d("2021-03-31"), d("2021-04-30")},
                        {0.01, 0.02, 0.03, NAN}};
  const SeriesColumn v2{"b",
                        {d("2021-02-28"), d("2021-03-31"), d("2021-04-30"), d("2021-05-31")},
                        {0.025, 0.031, 0.04, 0.05}};
  const ColumnDiff diff = diff_column(v1, v2);
  ASSERT_EQ(diff.removed.size(), 1u);
  EXPECT_EQ(diff.removed[0], d("2021-01-31"));
  ASSERT_EQ(diff.added.size(), 1u);
  EXPECT_EQ(diff.added[0], d("2021-05-31"));
  ASSERT_EQ(diff.changed.size(), 3u);
  EXPECT_EQ(diff.changed[0].date, d("2021-04-30"));  // from missing: sorts first
  EXPECT_TRUE(std::isnan(diff.changed[0].before));
  EXPECT_EQ(diff.changed[1].date, d("2021-02-28"));  // |0.025 - 0.02| = 0.005
  EXPECT_EQ(diff.changed[2].date, d("2021-03-31"));  // |0.031 - 0.03| = 0.001
}

TEST(SeriesDiff, IdenticalColumnsHaveNoDifference) {
  const SeriesColumn v{"b", {d("2021-01-31"), d("2021-02-28")}, {0.01, NAN}};
  EXPECT_TRUE(diff_column(v, v).empty());
}

}  // namespace
}  // namespace alphatrail::core
