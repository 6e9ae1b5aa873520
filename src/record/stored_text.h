// Reading JSON text a run stored (its parameters and its result) as what it should be. The
// ledger holds these texts under hashes but SQLite does not stop an edit made outside
// alphatrail, so every read is checked: a text that is not JSON, a missing key, a value of the
// wrong type, an unknown name or a number out of range throws StoredTextError (a corruption
// Error) naming the run and the field, e.g.
//   run 3: stored parameters: field 'errors' holds "bogus", not one of classic, hc0, hc1, hc2,
//   hc3, newey-west; the ledger was changed outside alphatrail (`alphatrail verify` lists what
//   was altered)
// Nothing here touches SQLite.
#pragma once

#include <cstdint>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/error.h"

namespace alphatrail::record {

// Stored text of a run that cannot be read as what it should be: Failure::corruption.
// problem() is the part after "run N: " and before the advice, for `verify` to list.
class StoredTextError : public Error {
 public:
  StoredTextError(std::int64_t run_id, const std::string& problem);
  std::int64_t run_id() const { return run_id_; }
  const std::string& problem() const { return problem_; }

 private:
  std::int64_t run_id_;
  std::string problem_;
};

// Checked reads of one stored JSON document of one run. Each accessor takes the value and its
// path ("sample.frequency", "factors[0].columns[1]") and throws StoredTextError when the value
// is not what is asked for; the messages name the path.
class StoredJson {
 public:
  using Json = nlohmann::ordered_json;

  // Parses text as the document `what` ("parameters", "result") of run `run_id`; the top level
  // must be an object.
  StoredJson(std::int64_t run_id, std::string what, std::string_view text);

  const Json& root() const { return root_; }
  Json take() { return std::move(root_); }

  // Throws StoredTextError for the value at path.
  [[noreturn]] void fail(const std::string& path, const std::string& problem) const;

  // Returns object[key]; throws when object has no such key.
  const Json& member(const Json& object, const std::string& path, const std::string& key) const;
  // Returns a pointer to object[key], nullptr when absent.
  const Json* optional_member(const Json& object, const std::string& key) const;

  const Json& object(const Json& v, const std::string& path) const;
  const Json& array(const Json& v, const std::string& path) const;
  std::string text(const Json& v, const std::string& path) const;
  bool flag(const Json& v, const std::string& path) const;
  // A number (integer or not); null is refused.
  double number(const Json& v, const std::string& path) const;
  // A number or null (a figure that could not be computed).
  void number_or_null(const Json& v, const std::string& path) const;
  // A whole number in [low, high].
  std::int64_t whole(const Json& v, const std::string& path, std::int64_t low,
                     std::int64_t high) const;
  // Text that is one of `names`; returns its index.
  std::size_t one_of(const Json& v, const std::string& path,
                     const std::vector<std::string>& names) const;
  // An array of text.
  std::vector<std::string> texts(const Json& v, const std::string& path) const;

 private:
  std::int64_t run_id_;
  std::string what_;
  Json root_;
};

// Returns a JSON path joined: path_of("sample", "first") == "sample.first".
std::string path_of(const std::string& parent, const std::string& key);
// Returns an element path: element_of("factors", 0) == "factors[0]".
std::string element_of(const std::string& parent, std::size_t index);

}  // namespace alphatrail::record
