// Parsing and validation of an ingest file: a CSV with a header row, one date column and one or
// more series columns, turned into columns of dates and values. Pure computation: the caller
// reads the file and passes its bytes; the result owns copies of everything it holds.
//
// Values in the result: for strategy, benchmark and factor files, simple returns in decimal
// (percent divided by 100; levels turned into r_t = P_t / P_{t-1} - 1, the first level and a
// level after a missing one giving no return); for rate files, the yields as the file states
// them (the unit is metadata). NaN marks a missing value. Each column is trimmed of leading and
// trailing missing values; dates are sorted ascending.
//
// Column names are header cells trimmed of spaces and tabs; each selected one must be a
// storable name (core/text.h: UTF-8, no control characters, no white space around it).
// Every value of the result is finite, and every return above -1 and at most kLargestReturn
// unless allowed: values derived from valid cells (returns from levels) are checked too.
//
// Failure: any problem throws InputError "FILE:LINE:COLUMN: problem (fix)" with the position
// of the offending cell (LINE is the physical line, the header being line 1; COLUMN the 1-based
// field index); problems of a whole column point at its header cell, problems of the whole
// file carry no position. Nothing is returned on failure.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/dates.h"
#include "core/vocabulary.h"

namespace alphatrail::core {

enum class SeriesKind { strategy, benchmark, rate, factor };
// How the file states its values.
enum class ValueUnit { decimal, percent, levels };
// How a rate file quotes its yields (rates only).
enum class RateQuote { yield, discount };

// The names used in options and the ledger, in the order `ingest --help` lists them.
inline constexpr auto kSeriesKinds = vocabulary<Word<SeriesKind>>({
    {SeriesKind::strategy, "strategy"},
    {SeriesKind::benchmark, "benchmark"},
    {SeriesKind::rate, "rate"},
    {SeriesKind::factor, "factor"},
});
inline constexpr auto kValueUnits = vocabulary<Word<ValueUnit>>({
    {ValueUnit::decimal, "decimal"},
    {ValueUnit::percent, "percent"},
    {ValueUnit::levels, "levels"},
});
inline constexpr auto kRateQuotes = vocabulary<Word<RateQuote>>({
    {RateQuote::yield, "yield"},
    {RateQuote::discount, "discount"},
});

// Returns "strategy", "benchmark", "rate" or "factor".
// Example: series_kind_name(SeriesKind::rate) == std::string("rate")
inline const char* series_kind_name(SeriesKind kind) {
  return kSeriesKinds.name(kind);
}
// Parses a series kind name; nullopt when unknown.
// Example: parse_series_kind("factor") == SeriesKind::factor
inline std::optional<SeriesKind> parse_series_kind(std::string_view name) {
  return kSeriesKinds.parse(name);
}

// Returns "decimal", "percent" or "levels".
// Example: value_unit_name(ValueUnit::levels) == std::string("levels")
inline const char* value_unit_name(ValueUnit unit) {
  return kValueUnits.name(unit);
}

// Returns "yield" or "discount".
// Example: rate_quote_name(RateQuote::discount) == std::string("discount")
inline const char* rate_quote_name(RateQuote quote) {
  return kRateQuotes.name(quote);
}
// Parses a rate quote name; nullopt when unknown.
// Example: parse_rate_quote("yield") == RateQuote::yield
inline std::optional<RateQuote> parse_rate_quote(std::string_view name) {
  return kRateQuotes.parse(name);
}

// Returns the unit a kind is read in unless the user says otherwise: percent for rates,
// decimal for the others.
// Example: default_unit(SeriesKind::rate) == ValueUnit::percent
ValueUnit default_unit(SeriesKind kind);

// Returns true for a tenor name: a positive integer followed by D, W, M or Y (either case).
// Example: is_tenor("13W") && is_tenor("1m") && !is_tenor("M1")
bool is_tenor(std::string_view name);

// The largest return one period may have without SeriesFileOptions::allow_large_returns:
// +1,000% (10 as a decimal), after percent conversion and for returns from levels.
inline constexpr double kLargestReturn = 10;

struct SeriesFileOptions {
  SeriesKind kind = SeriesKind::strategy;
  std::string date_column;              // empty: the first column
  std::vector<std::string> columns;     // empty: every other column; the result keeps file order
  ValueUnit unit = ValueUnit::decimal;  // rates: percent or decimal only
  RateQuote quote = RateQuote::yield;   // rates only; metadata, values are not converted
  // New name of the single series column (error when there are several); a storable name as
  // core/text.h defines it, used as it is.
  std::string rename;
  // Accept a return above kLargestReturn in one period (returns only; rates have their range).
  bool allow_large_returns = false;
  // Threads for reading rows (only files without quotes in the rows are split): 0 picks
  // std::thread::hardware_concurrency(), and one for files under 1 MiB. Any count gives the
  // same result and the same first error.
  unsigned threads = 0;
};

struct SeriesColumn {
  std::string name;            // header name, or options.rename; rate tenors upper-cased
  std::vector<Day> dates;      // ascending, unique
  std::vector<double> values;  // same length as dates; NaN = missing
};

struct SeriesFile {
  std::vector<SeriesColumn> columns;  // in file order
  bool month_only_dates = false;      // the file wrote its dates as YYYY-MM
  std::vector<std::string> notes;     // things the user should know, e.g. dates were sorted
};

// Parses and validates an ingest file; `display_name` is the path as the user typed it and
// prefixes every error message.
// Example: parse_series_file("a.csv", "date,a\n2021-01,1.5\n2021-02,-2\n",
//                            {.kind = SeriesKind::strategy, .unit = ValueUnit::percent})
//          gives one column "a" with values 0.015 and -0.02.
SeriesFile parse_series_file(const std::string& display_name, std::string_view content,
                             const SeriesFileOptions& options);

}  // namespace alphatrail::core
