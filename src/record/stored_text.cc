#include "record/stored_text.h"

#include <fmt/format.h>

#include <cmath>
#include <limits>

namespace alphatrail::record {

namespace {

const char* kAdvice =
    "the ledger was changed outside alphatrail (`alphatrail verify` lists what was altered)";

// The value as JSON text, shortened for a message.
std::string shown(const nlohmann::ordered_json& v) {
  std::string text = v.dump(-1, ' ', true, nlohmann::ordered_json::error_handler_t::replace);
  if (text.size() > 40) text = text.substr(0, 37) + "...";
  return text;
}

const char* type_of(const nlohmann::ordered_json& v) {
  switch (v.type()) {
    case nlohmann::ordered_json::value_t::null: return "null";
    case nlohmann::ordered_json::value_t::object: return "an object";
    case nlohmann::ordered_json::value_t::array: return "an array";
    case nlohmann::ordered_json::value_t::string: return "text";
    case nlohmann::ordered_json::value_t::boolean: return "true or false";
    case nlohmann::ordered_json::value_t::number_integer:
    case nlohmann::ordered_json::value_t::number_unsigned: return "a whole number";
    case nlohmann::ordered_json::value_t::number_float: return "a number";
    default: return "a value";
  }
}

}  // namespace

StoredTextError::StoredTextError(std::int64_t run_id, const std::string& problem)
    : Error(Failure::corruption, fmt::format("run {}: {}; {}", run_id, problem, kAdvice)),
      run_id_(run_id),
      problem_(problem) {}

StoredJson::StoredJson(std::int64_t run_id, std::string what, std::string_view text)
    : run_id_(run_id), what_(std::move(what)) {
  try {
    root_ = Json::parse(text);
  } catch (const nlohmann::json::parse_error& e) {
    throw StoredTextError(
        run_id_, fmt::format("stored {}: not JSON text (syntax error at byte {})", what_, e.byte));
  }
  if (!root_.is_object())
    throw StoredTextError(
        run_id_, fmt::format("stored {}: not a JSON object but {}", what_, type_of(root_)));
}

void StoredJson::fail(const std::string& path, const std::string& problem) const {
  throw StoredTextError(run_id_, fmt::format("stored {}: field '{}' {}", what_, path, problem));
}

const StoredJson::Json& StoredJson::member(const Json& object, const std::string& path,
                                           const std::string& key) const {
  const auto it = object.find(key);
  if (it == object.end()) fail(path_of(path, key), "is missing");
  return *it;
}

const StoredJson::Json* StoredJson::optional_member(const Json& object,
                                                    const std::string& key) const {
  const auto it = object.find(key);
  return it == object.end() ? nullptr : &*it;
}

const StoredJson::Json& StoredJson::object(const Json& v, const std::string& path) const {
  if (!v.is_object()) fail(path, fmt::format("holds {} ({}), not an object", shown(v), type_of(v)));
  return v;
}

const StoredJson::Json& StoredJson::array(const Json& v, const std::string& path) const {
  if (!v.is_array()) fail(path, fmt::format("holds {} ({}), not an array", shown(v), type_of(v)));
  return v;
}

std::string StoredJson::text(const Json& v, const std::string& path) const {
  if (!v.is_string()) fail(path, fmt::format("holds {} ({}), not text", shown(v), type_of(v)));
  return v.get<std::string>();
}

bool StoredJson::flag(const Json& v, const std::string& path) const {
  if (!v.is_boolean())
    fail(path, fmt::format("holds {} ({}), not true or false", shown(v), type_of(v)));
  return v.get<bool>();
}

double StoredJson::number(const Json& v, const std::string& path) const {
  if (!v.is_number()) fail(path, fmt::format("holds {} ({}), not a number", shown(v), type_of(v)));
  return v.get<double>();
}

void StoredJson::number_or_null(const Json& v, const std::string& path) const {
  if (!v.is_number() && !v.is_null())
    fail(path, fmt::format("holds {} ({}), not a number or null", shown(v), type_of(v)));
}

std::int64_t StoredJson::whole(const Json& v, const std::string& path, std::int64_t low,
                               std::int64_t high) const {
  const auto range = [&] {
    return high >= std::numeric_limits<int>::max() ? fmt::format("{} or more", low)
                                                   : fmt::format("{} to {}", low, high);
  };
  if (!v.is_number_integer())
    fail(path,
         fmt::format("holds {} ({}), not a whole number ({})", shown(v), type_of(v), range()));
  if (v.is_number_unsigned() &&
      v.get<std::uint64_t>() > static_cast<std::uint64_t>(std::numeric_limits<std::int64_t>::max()))
    fail(path, fmt::format("holds {}, larger than {}", shown(v), high));
  const auto n = v.get<std::int64_t>();
  if (n > high) fail(path, fmt::format("holds {}, larger than {}", n, high));
  if (n < low) fail(path, fmt::format("holds {}, out of range ({})", n, range()));
  return n;
}

std::size_t StoredJson::one_of(const Json& v, const std::string& path,
                               const std::vector<std::string>& names) const {
  const std::string t = text(v, path);
  for (std::size_t i = 0; i < names.size(); ++i)
    if (t == names[i]) return i;
  fail(path, fmt::format("holds {}, not one of {}", shown(v), fmt::join(names, ", ")));
}

std::vector<std::string> StoredJson::texts(const Json& v, const std::string& path) const {
  std::vector<std::string> out;
  for (std::size_t i = 0; i < array(v, path).size(); ++i)
    out.push_back(text(v[i], element_of(path, i)));
  return out;
}

std::string path_of(const std::string& parent, const std::string& key) {
  return parent.empty() ? key : parent + "." + key;
}

std::string element_of(const std::string& parent, std::size_t index) {
  return fmt::format("{}[{}]", parent, index);
}

}  // namespace alphatrail::record
