// A vocabulary: the values of an enum, each with its wire name (as options, output and the ledger
// spell it), in one table. Naming a value, parsing a name and listing the names are all derived
// from the table, so each value has exactly one spelling. A row may carry more about its value
// (Frequency's rows also hold the noun of one period and the periods in a year).
//
// A table is a constexpr constant beside its enum and owns nothing (the names are string
// literals). Building one is checked at compile time: a missing name, a value listed twice or a
// name used twice does not compile. Naming a value that has no row (an enumerator added without
// one) throws Error(internal); parsing an unknown name gives nullopt.
//
// Example:
//   inline constexpr auto kRateQuotes = core::vocabulary<core::Word<RateQuote>>(
//       {{RateQuote::yield, "yield"}, {RateQuote::discount, "discount"}});
//   kRateQuotes.name(RateQuote::yield) == std::string("yield")
//   kRateQuotes.parse("discount") == RateQuote::discount
#pragma once

#include <array>
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/error.h"

namespace alphatrail::core {

// The row of a plain vocabulary: a value and its wire name.
template <typename E>
struct Word {
  E value;
  const char* name;
};

// A table of rows, each with a `value` (an enum) and a `name` (its wire text), in the order
// --help and messages list them.
template <typename Row, std::size_t N>
class Vocabulary {
 public:
  using Value = decltype(Row::value);

  // Takes the rows; throws (and so does not compile as a constant) on a missing or repeated
  // name or a repeated value.
  consteval explicit Vocabulary(const Row (&rows)[N]) {
    for (std::size_t i = 0; i < N; ++i) {
      rows_[i] = rows[i];
      if (rows[i].name == nullptr || *rows[i].name == '\0') throw "a row has no name";
      for (std::size_t j = 0; j < i; ++j) {
        if (rows[j].value == rows[i].value) throw "a value has two rows";
        if (std::string_view(rows[j].name) == rows[i].name) throw "a name is used twice";
      }
    }
  }

  // Returns the row of a value; throws Error(internal) when the value has none.
  constexpr const Row& row(Value value) const {
    for (const Row& r : rows_)
      if (r.value == value) return r;
    throw Error(Failure::internal, "a value has no row in its vocabulary");
  }
  // Returns the wire name of a value. Example: kErrorKinds.name(ErrorKind::hc3) is "hc3".
  constexpr const char* name(Value value) const { return row(value).name; }
  // Returns the value a wire name stands for (exact, case-sensitive); nullopt when unknown.
  constexpr std::optional<Value> parse(std::string_view name) const {
    for (const Row& r : rows_)
      if (name == r.name) return r.value;
    return std::nullopt;
  }
  // Returns every wire name in table order.
  std::vector<std::string> names() const {
    std::vector<std::string> out;
    out.reserve(N);
    for (const Row& r : rows_) out.emplace_back(r.name);
    return out;
  }
  // Returns the rows in table order.
  constexpr const std::array<Row, N>& rows() const { return rows_; }

 private:
  std::array<Row, N> rows_{};
};

// Builds a vocabulary from its rows, counting them.
// Example: vocabulary<Word<RateTiming>>({{RateTiming::start, "start"}, {RateTiming::end, "end"}})
template <typename Row, std::size_t N>
consteval Vocabulary<Row, N> vocabulary(const Row (&rows)[N]) {
  return Vocabulary<Row, N>(rows);
}

}  // namespace alphatrail::core
