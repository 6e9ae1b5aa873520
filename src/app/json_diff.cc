#include "app/json_diff.h"

#include <fmt/format.h>

namespace alphatrail::app {

std::vector<JsonDifference> json_differences(const nlohmann::ordered_json& a,
                                             const nlohmann::ordered_json& b,
                                             const std::string& path) {
  std::vector<JsonDifference> out;
  const auto add = [&](std::vector<JsonDifference> more) {
    out.insert(out.end(), more.begin(), more.end());
  };
  if (a.is_object() && b.is_object()) {
    const auto child = [&](const std::string& key) {
      return path.empty() ? key : fmt::format("{}.{}", path, key);
    };
    for (const auto& [key, value] : a.items()) {
      if (b.contains(key))
        add(json_differences(value, b.at(key), child(key)));
      else
        out.push_back({child(key), value, nullptr});
    }
    for (const auto& [key, value] : b.items())
      if (!a.contains(key)) out.push_back({child(key), nullptr, value});
    return out;
  }
  if (a.is_array() && b.is_array() && a.size() == b.size()) {
    for (std::size_t i = 0; i < a.size(); ++i)
      add(json_differences(a[i], b[i], fmt::format("{}[{}]", path, i)));
    return out;
  }
  if (a != b) out.push_back({path, a, b});
  return out;
}

}  // namespace alphatrail::app
