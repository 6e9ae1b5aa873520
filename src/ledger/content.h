// The canonical form of a series version's content: how observations are stored in the
// ledger (a JSON object per column, {"YYYY-MM-DD": value | null, ...}, dates ascending,
// values in their shortest round-trip decimal form) and the SHA-256 content hash over it.
//
// The stored text is itself the canonical form, so `verify` can recompute every hash from
// what the ledger holds.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/dates.h"
#include "core/series_file.h"

namespace alphatrail::ledger {

// One column of a version: dates ascending, NaN marks a missing value.
using ColumnData = core::SeriesColumn;

// What identifies the meaning of a version's numbers besides the numbers themselves.
struct ContentMeta {
  std::string kind;                  // strategy | benchmark | rate | factor
  std::string unit;                  // decimal return | percent yield | decimal yield
  std::optional<std::string> quote;  // rates: yield | discount
};

// Encodes a column's observations as canonical JSON.
// Example: {"2021-01-29":0.012,"2021-02-26":null}.
std::string encode_values_json(const ColumnData& column);

// Decodes canonical JSON into a column; throws alphatrail::Error(ledger) when malformed.
ColumnData decode_values_json(const std::string& name, std::string_view json);

struct EncodedColumn {
  std::string name;
  std::string values_json;
};

// Returns the SHA-256 content hash of a version: metadata and every column in order.
std::string content_hash(const ContentMeta& meta, const std::vector<EncodedColumn>& columns);

}  // namespace alphatrail::ledger
