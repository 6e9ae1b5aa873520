// Lists the differences between two JSON values as paths, for reproduce and compare.
#pragma once

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace alphatrail::cli {

struct JsonDifference {
  std::string path;  // e.g. "statistics.r_squared", "coefficients[0].std_error"
  nlohmann::ordered_json before;
  nlohmann::ordered_json after;
};

// Returns every leaf where a and b differ (numbers compared exactly).
std::vector<JsonDifference> json_differences(const nlohmann::ordered_json& a,
                                             const nlohmann::ordered_json& b,
                                             const std::string& path = "");

}  // namespace alphatrail::cli
