// A check shared by the vocabulary tests of each layer: a table names every value it lists by
// the expected wire names, in order, and each name parses back to its value.
#pragma once

#include <gtest/gtest.h>

#include <set>
#include <string>
#include <vector>

#include "core/vocabulary.h"

namespace alphatrail::testing {

// Checks that `vocabulary` lists exactly `names` in that order, that every name is used once
// and that parse(name(v)) == v for every value v.
template <typename Row, std::size_t N>
void expect_round_trip(const core::Vocabulary<Row, N>& vocabulary,
                       const std::vector<std::string>& names) {
  EXPECT_EQ(vocabulary.names(), names);
  const std::vector<std::string> listed = vocabulary.names();
  EXPECT_EQ(std::set<std::string>(listed.begin(), listed.end()).size(), listed.size());
  for (const Row& row : vocabulary.rows()) {
    EXPECT_STREQ(vocabulary.name(row.value), row.name);
    EXPECT_EQ(vocabulary.parse(vocabulary.name(row.value)), row.value) << row.name;
  }
  EXPECT_EQ(vocabulary.parse(""), std::nullopt);
  EXPECT_EQ(vocabulary.parse("unknown"), std::nullopt);
}

}  // namespace alphatrail::testing
