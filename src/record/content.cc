#include "record/content.h"

#include <fmt/compile.h>
#include <fmt/format.h>

#include <algorithm>
#include <bit>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <functional>
#include <limits>
#include <optional>

#include "core/error.h"
#include "core/sha256.h"

namespace alphatrail::record {

namespace {

// Writes "YYYY-MM-DD" at p and returns the position after it.
char* write_date(char* p, core::Day day) {
  const core::CivilDate c = core::to_civil(day);
  int y = c.year;
  for (int i = 3; i >= 0; --i, y /= 10) p[i] = static_cast<char>('0' + y % 10);
  p[4] = '-';
  p[5] = static_cast<char>('0' + c.month / 10);
  p[6] = static_cast<char>('0' + c.month % 10);
  p[7] = '-';
  p[8] = static_cast<char>('0' + c.day / 10);
  p[9] = static_cast<char>('0' + c.day % 10);
  return p + 10;
}

// Reads the "YYYY-MM-DD" that encode_values_json writes; nullopt for anything else. Decoding
// is the hot path of every evaluation, so this skips the general date parser.
std::optional<core::Day> read_date(const char* p) {
  const auto digit = [&](int i) { return static_cast<unsigned>(p[i] - '0'); };
  for (int i : {0, 1, 2, 3, 5, 6, 8, 9})
    if (digit(i) > 9) return std::nullopt;
  if (p[4] != '-' || p[7] != '-') return std::nullopt;
  const int year = static_cast<int>(digit(0) * 1000 + digit(1) * 100 + digit(2) * 10 + digit(3));
  const int month = static_cast<int>(digit(5) * 10 + digit(6));
  const int day = static_cast<int>(digit(8) * 10 + digit(9));
  if (month < 1 || month > 12 || day < 1 || day > core::days_in_month(year, month))
    return std::nullopt;
  return core::to_day({year, month, day});
}

[[noreturn]] void malformed(const std::string& name, std::size_t at) {
  throw Error(Failure::unusable_ledger,
              fmt::format("stored observations of column '{}' are malformed at byte {}; run "
                          "`alphatrail verify` and restore the ledger from a copy",
                          name, at));
}

// Turns n little-endian words in place into the host's order: nothing on little-endian hosts.
template <typename T, typename Word>
void to_host_order(T* words, std::size_t n) {
  static_assert(sizeof(T) == sizeof(Word));
  if constexpr (std::endian::native != std::endian::little) {
    for (std::size_t i = 0; i < n; ++i) {
      unsigned char bytes[sizeof(Word)];
      std::memcpy(bytes, words + i, sizeof bytes);
      Word w = 0;
      for (std::size_t b = 0; b < sizeof(Word); ++b) w |= static_cast<Word>(bytes[b]) << (8 * b);
      std::memcpy(words + i, &w, sizeof w);
    }
  }
}

// Writes w's bytes in little-endian order at p and returns the position after them.
template <typename Word>
char* write_little_endian(char* p, Word w) {
  if constexpr (std::endian::native == std::endian::little) {
    std::memcpy(p, &w, sizeof w);
  } else {
    for (std::size_t b = 0; b < sizeof(Word); ++b) p[b] = static_cast<char>(w >> (8 * b));
  }
  return p + sizeof w;
}

[[noreturn]] void corrupted_packing(const std::string& name, const std::string& problem) {
  throw Error(Failure::unusable_ledger,
              fmt::format("the packed copy of column '{}' is corrupted: {}; run `alphatrail "
                          "verify` and restore the ledger from a copy",
                          name, problem));
}

// Refuses a value the canonical form cannot hold. JSON has no infinity, so text holding one
// could never be decoded or verified, and versions are immutable: ingest refuses such values
// with their file position first, so reaching this is a bug of whatever produced the column.
[[noreturn]] void not_storable(const ColumnData& column, std::size_t i) {
  throw Error(Failure::internal,
              fmt::format("internal error: column '{}' holds {} on {}, which the ledger cannot "
                          "store; this is a bug, please report it; nothing was written",
                          column.name, column.values[i], core::format_date(column.dates[i])));
}

}  // namespace

PackedColumn encode_packed(const ColumnData& column) {
  const std::size_t n = column.dates.size();
  PackedColumn packed{std::string(4 * n, '\0'), std::string(8 * n, '\0')};
  char* d = packed.days.data();
  char* v = packed.numbers.data();
  for (std::size_t i = 0; i < n; ++i) {
    d = write_little_endian(d, static_cast<std::uint32_t>(column.dates[i]));
    // One NaN for every missing value, the one decode_values_json gives, so that a packed copy
    // is a function of the JSON and verify can compare bytes.
    const double x =
        std::isnan(column.values[i]) ? std::numeric_limits<double>::quiet_NaN() : column.values[i];
    if (std::isinf(x)) not_storable(column, i);
    v = write_little_endian(v, std::bit_cast<std::uint64_t>(x));
  }
  return packed;
}

ColumnData packed_column_shape(const std::string& name, std::size_t days_bytes,
                               std::size_t numbers_bytes) {
  if (days_bytes % 4 != 0 || numbers_bytes != 2 * days_bytes)
    corrupted_packing(name, fmt::format("{} bytes of days and {} bytes of numbers (expected 4 "
                                        "and 8 bytes an observation)",
                                        days_bytes, numbers_bytes));
  const std::size_t n = days_bytes / 4;
  return ColumnData{name, std::vector<core::Day>(n), std::vector<double>(n)};
}

void finish_packed(ColumnData& column) {
  const std::size_t n = column.dates.size();
  to_host_order<core::Day, std::uint32_t>(column.dates.data(), n);
  to_host_order<double, std::uint64_t>(column.values.data(), n);
  // Dates ascending, unique and within the JSON's years, as decode_values_json guarantees to
  // everything downstream (date arithmetic overflows far outside them).
  const auto out_of_order =
      std::adjacent_find(column.dates.begin(), column.dates.end(), std::greater_equal<>());
  if (out_of_order != column.dates.end())
    corrupted_packing(column.name, fmt::format("its dates are not ascending at observation {}",
                                               out_of_order - column.dates.begin() + 2));
  if (n > 0 && (column.dates.front() < kFirstStoredDay || column.dates.back() > kLastStoredDay)) {
    const bool early = column.dates.front() < kFirstStoredDay;
    corrupted_packing(
        column.name,
        fmt::format("observation {} has day number {}, outside 0000-01-01 .. "
                    "9999-12-31",
                    early ? 1 : n, early ? column.dates.front() : column.dates.back()));
  }
}

ColumnData decode_packed(const std::string& name, std::string_view days, std::string_view numbers) {
  ColumnData column = packed_column_shape(name, days.size(), numbers.size());
  if (!days.empty()) {  // memcpy must not see the null pointers of empty buffers
    std::memcpy(column.dates.data(), days.data(), days.size());
    std::memcpy(column.values.data(), numbers.data(), numbers.size());
  }
  finish_packed(column);
  return column;
}

std::string encode_values_json(const ColumnData& column) {
  // Written into a buffer sized for the longest entry: ',"YYYY-MM-DD":' plus at most 24
  // characters of number; appending piece by piece was the ingest's hot spot.
  constexpr std::size_t kLongestEntry = 15 + 24;
  std::string out(column.dates.size() * kLongestEntry + 2, '\0');
  char* p = out.data();
  *p++ = '{';
  for (std::size_t i = 0; i < column.dates.size(); ++i) {
    if (i > 0) *p++ = ',';
    *p++ = '"';
    p = write_date(p, column.dates[i]);
    *p++ = '"';
    *p++ = ':';
    const double v = column.values[i];
    if (std::isnan(v)) {
      // JSON text, not a C string: no terminator belongs here.
      std::memcpy(p, "null", 4);  // NOLINT(bugprone-not-null-terminated-result)
      p += 4;
    } else if (std::isinf(v)) {
      not_storable(column, i);
    } else {
      p = fmt::format_to(p, FMT_COMPILE("{}"), v);  // shortest round-trip form
    }
  }
  *p++ = '}';
  out.resize(static_cast<std::size_t>(p - out.data()));
  return out;
}

ColumnData decode_values_json(const std::string& name, std::string_view json) {
  ColumnData column;
  column.name = name;
  column.dates.reserve(json.size() / 24);
  column.values.reserve(json.size() / 24);
  std::size_t i = 0;
  const auto expect = [&](char c) {
    if (i >= json.size() || json[i] != c) malformed(name, i);
    ++i;
  };
  expect('{');
  if (i < json.size() && json[i] == '}') {
    if (i + 1 != json.size()) malformed(name, i + 1);
    return column;
  }
  while (true) {
    expect('"');
    if (i + 10 > json.size()) malformed(name, i);
    const auto date = read_date(json.data() + i);
    if (!date) malformed(name, i);
    i += 10;
    expect('"');
    expect(':');
    double value = NAN;
    if (json.substr(i, 4) == "null") {
      i += 4;
    } else {
      const auto [end, ec] = std::from_chars(json.data() + i, json.data() + json.size(), value);
      if (ec != std::errc() || !std::isfinite(value)) malformed(name, i);  // JSON has no nan/inf
      i = static_cast<std::size_t>(end - json.data());
    }
    if (!column.dates.empty() && *date <= column.dates.back()) malformed(name, i);  // ascending
    column.dates.push_back(*date);
    column.values.push_back(value);
    if (i < json.size() && json[i] == ',') {
      ++i;
      continue;
    }
    expect('}');
    if (i != json.size()) malformed(name, i);
    return column;
  }
}

std::string content_hash(const ContentMeta& meta, const std::vector<EncodedColumn>& columns) {
  core::Sha256 h;
  h.update("alphatrail content v1\nkind: ");
  h.update(meta.kind);
  h.update("\nunit: ");
  h.update(meta.unit);
  h.update("\nquote: ");
  h.update(meta.quote.value_or("none"));
  h.update("\n");
  for (const auto& c : columns) {
    h.update("column: ");
    h.update(c.name);
    h.update("\n");
    h.update(c.values_json);
    h.update("\n");
  }
  return h.hex();
}

StoredUnit stored_unit_for(core::SeriesKind kind, core::ValueUnit unit) {
  if (kind != core::SeriesKind::rate) return StoredUnit::decimal_return;
  return unit == core::ValueUnit::percent ? StoredUnit::percent_yield : StoredUnit::decimal_yield;
}

core::RateUnit stored_rate_unit(const std::string& series, std::string_view unit) {
  const auto stored = kStoredUnits.parse(unit);
  if (stored == StoredUnit::percent_yield) return core::RateUnit::percent;
  if (stored == StoredUnit::decimal_yield) return core::RateUnit::decimal;
  throw Error(Failure::corruption,
              fmt::format("rate curve {} is stored with unit \"{}\", which is not a yield unit; "
                          "the ledger was edited outside alphatrail (`alphatrail verify` checks "
                          "it)",
                          series, unit));
}

core::RateQuote stored_rate_quote(const std::string& series,
                                  const std::optional<std::string>& quote) {
  if (!quote) return core::RateQuote::yield;
  if (const auto q = core::kRateQuotes.parse(*quote)) return *q;
  throw Error(Failure::corruption,
              fmt::format("rate curve {} is stored with quote \"{}\", which is neither yield "
                          "nor discount; the ledger was edited outside alphatrail (`alphatrail "
                          "verify` checks it)",
                          series, *quote));
}

}  // namespace alphatrail::record
