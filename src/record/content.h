// The canonical form of a series version's content: how observations are stored in the
// ledger (a JSON object per column, {"YYYY-MM-DD": value | null, ...}, dates ascending,
// values in their shortest round-trip decimal form) and the SHA-256 content hash over it.
//
// The stored text is itself the canonical form, so `verify` can recompute every hash from
// what the ledger holds. Beside it the ledger keeps a packed binary copy of each column
// (little-endian 32-bit day numbers and IEEE 754 doubles), which loads without parsing; the
// copy is never hashed, and `verify` checks it equals the decoded JSON.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/dates.h"
#include "core/rates.h"
#include "core/series_file.h"
#include "core/vocabulary.h"

namespace alphatrail::record {

// One column of a version: dates ascending, NaN marks a missing value.
using ColumnData = core::SeriesColumn;

// What identifies the meaning of a version's numbers besides the numbers themselves.
struct ContentMeta {
  std::string kind;                  // strategy | benchmark | rate | factor
  std::string unit;                  // decimal return | percent yield | decimal yield
  std::optional<std::string> quote;  // rates: yield | discount
};

// The unit of a version's stored values, as series_versions.unit spells it: returns are kept as
// decimals, rate curves as the yields the file gave, in percent or decimal.
enum class StoredUnit { decimal_return, percent_yield, decimal_yield };

// The stored spellings.
inline constexpr auto kStoredUnits = core::vocabulary<core::Word<StoredUnit>>({
    {StoredUnit::decimal_return, "decimal return"},
    {StoredUnit::percent_yield, "percent yield"},
    {StoredUnit::decimal_yield, "decimal yield"},
});

// Returns the stored spelling: "decimal return", "percent yield" or "decimal yield".
inline const char* stored_unit_name(StoredUnit unit) {
  return kStoredUnits.name(unit);
}

// Returns the stored unit of values of a kind read in a unit (rates: percent or decimal).
// Example: stored_unit_for(SeriesKind::rate, ValueUnit::percent) == StoredUnit::percent_yield
StoredUnit stored_unit_for(core::SeriesKind kind, core::ValueUnit unit);

// Returns the unit of a stored rate version's yields; throws Error(corruption) naming the
// series when the stored text is not a yield unit (the ledger was edited).
core::RateUnit stored_rate_unit(const std::string& series, std::string_view unit);

// Returns how a stored rate version is quoted (no quote: yields); throws Error(corruption)
// naming the series for any other text.
core::RateQuote stored_rate_quote(const std::string& series,
                                  const std::optional<std::string>& quote);

// Encodes a column's observations as canonical JSON; throws alphatrail::Error(failure), an
// internal error, for an infinite value, which JSON cannot hold (NaN is missing: null).
// Example: {"2021-01-29":0.012,"2021-02-26":null}.
std::string encode_values_json(const ColumnData& column);

// Decodes canonical JSON into a column; throws alphatrail::Error(ledger) when malformed.
ColumnData decode_values_json(const std::string& name, std::string_view json);

// A column's observations packed for fast loading: n observations are 4 n bytes of days
// (core::Day, little-endian) and 8 n bytes of numbers (IEEE 754 binary64, little-endian).
struct PackedColumn {
  std::string days;     // bytes, not text
  std::string numbers;  // bytes, not text; every NaN written as the quiet NaN JSON decodes to
};

// The first and last day a stored column can hold: the years the JSON form writes, 0000-01-01
// and 9999-12-31.
inline constexpr core::Day kFirstStoredDay = -719528;
inline constexpr core::Day kLastStoredDay = 2932896;

// Packs a column's observations; the inverse of decode_packed. Refuses an infinite value as
// encode_values_json does, so that no packed copy holds what its JSON could not.
// Example: three observations pack into 12 bytes of days and 24 bytes of numbers.
PackedColumn encode_packed(const ColumnData& column);

// Unpacks a column's observations, giving what decode_values_json gives for the same column;
// throws alphatrail::Error(ledger) when the sizes disagree, the dates are not ascending or
// a date lies outside kFirstStoredDay .. kLastStoredDay.
ColumnData decode_packed(const std::string& name, std::string_view days, std::string_view numbers);

// The two halves of decode_packed, for a reader that copies the packed bytes straight into
// the column: the column sized for the byte counts (throws Error(ledger) when they disagree),
// then, once the bytes are in, put in the host's byte order and checked as decode_packed does.
ColumnData packed_column_shape(const std::string& name, std::size_t days_bytes,
                               std::size_t numbers_bytes);
void finish_packed(ColumnData& column);

struct EncodedColumn {
  std::string name;
  std::string values_json;
};

// Returns the SHA-256 content hash of a version: metadata and every column in order.
std::string content_hash(const ContentMeta& meta, const std::vector<EncodedColumn>& columns);

}  // namespace alphatrail::record
