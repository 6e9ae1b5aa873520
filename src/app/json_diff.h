// The differences between two JSON values, leaf by leaf, named by path: what reproduce and
// compare report. Pure; allocates only its result.
#pragma once

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace alphatrail::app {

struct JsonDifference {
  std::string path;  // e.g. "statistics.r_squared", "coefficients[0].std_error"
  nlohmann::ordered_json before;
  nlohmann::ordered_json after;
};

// Returns every leaf where a and b differ (numbers compared exactly).
std::vector<JsonDifference> json_differences(const nlohmann::ordered_json& a,
                                             const nlohmann::ordered_json& b,
                                             const std::string& path = "");

}  // namespace alphatrail::app
