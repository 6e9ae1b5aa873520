#include "core/series_file.h"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <cstring>
#include <random>
#include <string>
#include <vector>

#include "core/error.h"
#include "support/test_support.h"

namespace alphatrail::core {
namespace {

SeriesFileOptions options_for(SeriesKind kind, ValueUnit unit) {
  SeriesFileOptions options;
  options.kind = kind;
  options.unit = unit;
  return options;
}

const SeriesFileOptions kDecimal = options_for(SeriesKind::strategy, ValueUnit::decimal);
const SeriesFileOptions kPercent = options_for(SeriesKind::strategy, ValueUnit::percent);
const SeriesFileOptions kLevels = options_for(SeriesKind::benchmark, ValueUnit::levels);
const SeriesFileOptions kRatePercent = options_for(SeriesKind::rate, ValueUnit::percent);
const SeriesFileOptions kRateDecimal = options_for(SeriesKind::rate, ValueUnit::decimal);

std::string error_of(std::string_view text, const SeriesFileOptions& options = kDecimal) {
  try {
    parse_series_file("f.csv", text, options);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

std::string fixture_path(const std::string& name) {
  return "fixtures/ingest/" + name;
}

SeriesFile parse_fixture(const std::string& name, const SeriesFileOptions& options) {
  const std::string text = testing::read_file(testing::source_path(fixture_path(name)));
  return parse_series_file(fixture_path(name), text, options);
}

std::string fixture_error(const std::string& name, const SeriesFileOptions& options = kDecimal) {
  try {
    parse_fixture(name, options);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

Day day(const char* text) {
  return parse_date(text).day;
}

// Compares two results exactly, NaN included (bit patterns).
bool same(const SeriesFile& a, const SeriesFile& b) {
  if (a.month_only_dates != b.month_only_dates || a.notes != b.notes) return false;
  if (a.columns.size() != b.columns.size()) return false;
  for (std::size_t j = 0; j < a.columns.size(); ++j) {
    const auto& x = a.columns[j];
    const auto& y = b.columns[j];
    if (x.name != y.name || x.dates != y.dates || x.values.size() != y.values.size()) return false;
    if (std::memcmp(x.values.data(), y.values.data(), x.values.size() * sizeof(double)) != 0)
      return false;
  }
  return true;
}

// ---- names -------------------------------------------------------------------------------

TEST(SeriesFileNames, RoundTrip) {
  for (auto kind :
       {SeriesKind::strategy, SeriesKind::benchmark, SeriesKind::rate, SeriesKind::factor})
    EXPECT_EQ(parse_series_kind(series_kind_name(kind)), kind);
  for (auto unit : {ValueUnit::decimal, ValueUnit::percent, ValueUnit::levels})
    EXPECT_EQ(kValueUnits.parse(value_unit_name(unit)), unit);
  for (auto quote : {RateQuote::yield, RateQuote::discount})
    EXPECT_EQ(parse_rate_quote(rate_quote_name(quote)), quote);
  EXPECT_EQ(parse_series_kind("index"), std::nullopt);
  EXPECT_EQ(default_unit(SeriesKind::rate), ValueUnit::percent);
  EXPECT_EQ(default_unit(SeriesKind::factor), ValueUnit::decimal);
}

TEST(SeriesFileNames, RecognizesTenors) {
  for (const char* t : {"1D", "30D", "1W", "13W", "1M", "3M", "6M", "1Y", "10Y", "1m"})
    EXPECT_TRUE(is_tenor(t)) << t;
  for (const char* t : {"", "M", "1", "M1", "01M", "1.5Y", "1 M", "1MO", "-1M", "1Q"})
    EXPECT_FALSE(is_tenor(t)) << t;
}

// ---- valid files -------------------------------------------------------------------------

TEST(SeriesFile, ReadsDecimalReturnsAndTrimsMissingEnds) {
  const SeriesFile file = parse_fixture("monthly_decimal.csv", kDecimal);
  ASSERT_EQ(file.columns.size(), 3u);
  EXPECT_FALSE(file.month_only_dates);
  EXPECT_TRUE(file.notes.empty());
  const auto& fast = file.columns[0];
  EXPECT_EQ(fast.name, "carry_fast");
  EXPECT_EQ(fast.dates.size(), 6u);
  EXPECT_EQ(fast.dates.front(), day("2021-01-29"));
  EXPECT_EQ(fast.values, (std::vector<double>{0.0123, -0.0081, 0.0210, 0.0045, -0.0150, 0.0072}));
  // Interior NA stays as NaN.
  const auto& slow = file.columns[1];
  ASSERT_EQ(slow.values.size(), 6u);
  EXPECT_TRUE(std::isnan(slow.values[2]));
  EXPECT_EQ(slow.values[3], 0.0102);
  // carry_late starts in March and stops in May: the empty ends are dropped.
  const auto& late = file.columns[2];
  EXPECT_EQ(late.dates,
            (std::vector<Day>{day("2021-03-31"), day("2021-04-30"), day("2021-05-31")}));
  EXPECT_EQ(late.values, (std::vector<double>{0.0150, -0.0075, 0.0061}));
}

TEST(SeriesFile, DividesPercentByHundred) {
  const SeriesFile file = parse_fixture("monthly_percent.csv", kPercent);
  ASSERT_EQ(file.columns.size(), 1u);
  EXPECT_TRUE(file.month_only_dates);
  // 1.23% = 0.0123, -0.81% = -0.0081, 2.10% = 0.021.
  const auto& v = file.columns[0].values;
  ASSERT_EQ(v.size(), 3u);
  EXPECT_DOUBLE_EQ(v[0], 0.0123);
  EXPECT_DOUBLE_EQ(v[1], -0.0081);
  EXPECT_DOUBLE_EQ(v[2], 0.021);
  // YYYY-MM stands for the month's last day.
  EXPECT_EQ(file.columns[0].dates,
            (std::vector<Day>{day("2021-01-31"), day("2021-02-28"), day("2021-03-31")}));
  // 1.5 / 100 is exactly the double nearest 0.015.
  EXPECT_EQ(parse_series_file("f.csv", "d,a\n2021-01,1.5\n", kPercent).columns[0].values[0], 0.015);
}

TEST(SeriesFile, TurnsLevelsIntoReturns) {
  // Levels 100, 110, 99, (missing), 105, 126:
  //   Feb 110/100 - 1 = 0.10; Mar 99/110 - 1 = -0.10; Apr missing; May missing (the level
  //   before is missing); Jun 126/105 - 1 = 0.20. January, the first level, gives no return.
  const SeriesFile file = parse_fixture("levels.csv", kLevels);
  ASSERT_EQ(file.columns.size(), 1u);
  const auto& c = file.columns[0];
  EXPECT_EQ(c.name, "index_level");
  EXPECT_EQ(c.dates, (std::vector<Day>{day("2021-02-26"), day("2021-03-31"), day("2021-04-30"),
                                       day("2021-05-31"), day("2021-06-30")}));
  ASSERT_EQ(c.values.size(), 5u);
  EXPECT_NEAR(c.values[0], 0.10, 1e-15);
  EXPECT_NEAR(c.values[1], -0.10, 1e-15);
  EXPECT_TRUE(std::isnan(c.values[2]));
  EXPECT_TRUE(std::isnan(c.values[3]));
  EXPECT_NEAR(c.values[4], 0.20, 1e-15);
}

TEST(SeriesFile, KeepsRatesAsGiven) {
  SeriesFile file = parse_fixture("rates_percent.csv", kRatePercent);
  ASSERT_EQ(file.columns.size(), 2u);
  EXPECT_EQ(file.columns[0].name, "1M");
  EXPECT_EQ(file.columns[1].name, "3M");
  EXPECT_EQ(file.columns[0].values, (std::vector<double>{0.05, 0.04, 0.02}));
  // Decimal rates are not converted either.
  file = parse_series_file("f.csv", "date,3m\n2021-01,0.045\n", kRateDecimal);
  EXPECT_EQ(file.columns[0].name, "3M");  // one spelling per tenor
  EXPECT_EQ(file.columns[0].values, (std::vector<double>{0.045}));
}

TEST(SeriesFile, SortsDatesWithANote) {
  const SeriesFile file = parse_fixture("unsorted.csv", kDecimal);
  ASSERT_EQ(file.notes.size(), 1u);
  EXPECT_EQ(file.notes[0],
            "dates were out of order and have been sorted (line 4 has 2021-02-26 after "
            "2021-03-31)");
  EXPECT_EQ(file.columns[0].values, (std::vector<double>{0.01, 0.02, 0.03, 0.04}));
  EXPECT_EQ(file.columns[0].dates.front(), day("2021-01-29"));
  EXPECT_EQ(file.columns[0].dates.back(), day("2021-04-30"));
}

TEST(SeriesFile, SortsBeforeTurningLevelsIntoReturns) {
  // In date order the levels are 100, 110, 121: returns 0.10 and 0.10.
  const SeriesFile file =
      parse_series_file("f.csv", "date,p\n2021-03,121\n2021-01,100\n2021-02,110\n", kLevels);
  ASSERT_EQ(file.columns[0].values.size(), 2u);
  EXPECT_NEAR(file.columns[0].values[0], 0.10, 1e-15);
  EXPECT_NEAR(file.columns[0].values[1], 0.10, 1e-15);
  EXPECT_EQ(file.notes.size(), 1u);
}

TEST(SeriesFile, ReadsBomCrlfAndQuotedNames) {
  const SeriesFile file = parse_fixture("quoted_crlf_bom.csv", kDecimal);
  ASSERT_EQ(file.columns.size(), 3u);
  EXPECT_EQ(file.columns[0].name, "Fund, A");
  EXPECT_EQ(file.columns[1].name, "The \"B\" fund");
  EXPECT_EQ(file.columns[2].name, "plain");
  EXPECT_EQ(file.columns[0].values, (std::vector<double>{0.01, 0.04}));  // "0.04" was quoted
  EXPECT_EQ(file.columns[2].values, (std::vector<double>{0.03, 0.06}));
}

TEST(SeriesFile, CountsLinesInsideQuotedCells) {
  // The memo cell of line 2 spans lines 2 and 3, so the bad value is on line 4.
  SeriesFileOptions options = kDecimal;
  options.columns = {"a"};
  EXPECT_EQ(error_of("date,a,memo\r\n2021-01,0.01,\"two\r\nlines\"\r\n2021-02,zz,x\r\n", options),
            "f.csv:4:2: 'zz' is not a number (write plain numbers such as 0.0123 or -1.5e-3; "
            "leave the cell empty or write NA when a value is missing)");
}

TEST(SeriesFile, AcceptsMissingMarkersSignsAndBlanks) {
  const SeriesFile file = parse_series_file(
      "f.csv",
      "date , a\n 2021-01 ,+0.01\n2021-02, NA\n2021-03,n/a\n2021-04,na\n2021-05,\t-2e-2 \n",
      kDecimal);
  ASSERT_EQ(file.columns.size(), 1u);
  EXPECT_EQ(file.columns[0].name, "a");
  const auto& v = file.columns[0].values;
  ASSERT_EQ(v.size(), 5u);
  EXPECT_EQ(v[0], 0.01);
  EXPECT_TRUE(std::isnan(v[1]) && std::isnan(v[2]) && std::isnan(v[3]));
  EXPECT_EQ(v[4], -0.02);
}

TEST(SeriesFile, ParsesNumbersLikeFromChars) {
  // The fast path for plain decimals must give the same doubles as std::from_chars.
  const SeriesFile file = parse_series_file(
      "f.csv",
      "d,a\n2021-01,0.1\n2021-02,-0.0000001\n2021-03,0.123456789012345\n2021-04,.5\n"
      "2021-05,1e-3\n2021-06,0.30000000000000004441\n2021-07,-0\n2021-08,1e-999\n"
      "2021-09,0.1\n",
      kDecimal);
  const auto& v = file.columns[0].values;
  ASSERT_EQ(v.size(), 9u);
  EXPECT_EQ(v[0], 0.1);
  EXPECT_EQ(v[1], -0.0000001);
  EXPECT_EQ(v[2], 0.123456789012345);
  EXPECT_EQ(v[3], 0.5);
  EXPECT_EQ(v[4], 1e-3);
  EXPECT_EQ(v[5], 0.30000000000000004441);
  EXPECT_TRUE(v[6] == 0 && std::signbit(v[6]));
  EXPECT_EQ(v[7], 0.0);  // underflows to zero: tiny, but finite
}

TEST(SeriesFile, SelectsColumnsInFileOrder) {
  SeriesFileOptions options = kDecimal;
  options.columns = {"carry_late", "carry_fast"};
  const SeriesFile file = parse_fixture("monthly_decimal.csv", options);
  ASSERT_EQ(file.columns.size(), 2u);
  EXPECT_EQ(file.columns[0].name, "carry_fast");
  EXPECT_EQ(file.columns[1].name, "carry_late");
}

TEST(SeriesFile, FindsANamedDateColumn) {
  SeriesFileOptions options = kDecimal;
  options.date_column = "when";
  const SeriesFile file =
      parse_series_file("f.csv", "a,when,b\n0.01,2021-01,0.02\n0.03,2021-02,0.04\n", options);
  ASSERT_EQ(file.columns.size(), 2u);
  EXPECT_EQ(file.columns[0].name, "a");
  EXPECT_EQ(file.columns[1].values, (std::vector<double>{0.02, 0.04}));
  // A bad date is reported in the date column's position.
  EXPECT_EQ(error_of("a,when\n0.01,2021-1\n", options),
            "f.csv:2:2: '2021-1' is not a date (write dates as YYYY-MM-DD or YYYY-MM)");
}

TEST(SeriesFile, AcceptsAnUnnamedDateColumn) {
  // An index written without a name, as data frame exports do.
  const SeriesFile file = parse_series_file("f.csv", ",a\n2021-01,0.01\n", kDecimal);
  EXPECT_EQ(file.columns[0].name, "a");
}

TEST(SeriesFile, IgnoresUnselectedUnnamedOrRepeatedColumns) {
  SeriesFileOptions options = kDecimal;
  options.columns = {"a"};
  const SeriesFile file =
      parse_series_file("f.csv", "date,a,,x,x\n2021-01,0.01,junk,1,2\n", options);
  ASSERT_EQ(file.columns.size(), 1u);
  EXPECT_EQ(file.columns[0].values, (std::vector<double>{0.01}));
}

TEST(SeriesFile, RenamesTheSingleColumn) {
  SeriesFileOptions options = kDecimal;
  options.rename = "momentum";
  EXPECT_EQ(parse_series_file("f.csv", "date,x\n2021-01,0.01\n", options).columns[0].name,
            "momentum");
  SeriesFileOptions tenor = kRatePercent;
  tenor.rename = "1M";
  EXPECT_EQ(parse_fixture("rate_not_tenor.csv", tenor).columns[0].name, "1M");
}

TEST(SeriesFile, IgnoresTrailingBlankAndSeparatorRows) {
  const SeriesFile file =
      parse_series_file("f.csv", "date,a,b\r\n2021-01,0.01,0.02\r\n,,\r\n\r\n", kDecimal);
  EXPECT_EQ(file.columns[1].values, (std::vector<double>{0.02}));
}

// ---- invalid files: every message with its position --------------------------------------

TEST(SeriesFileErrors, EmptyFile) {
  const std::string fix =
      " (write a header row naming the date column and each series, then one row per date)";
  EXPECT_EQ(fixture_error("empty.csv"), "fixtures/ingest/empty.csv: the file is empty" + fix);
  EXPECT_EQ(error_of("\xEF\xBB\xBF"), "f.csv: the file is empty" + fix);
  EXPECT_EQ(error_of(" \r\n\n"), "f.csv: the file is empty" + fix);
}

TEST(SeriesFileErrors, HeaderWithoutRows) {
  EXPECT_EQ(fixture_error("header_only.csv"),
            "fixtures/ingest/header_only.csv: the file has a header but no data rows (add one "
            "row per date below the header)");
}

TEST(SeriesFileErrors, NoHeader) {
  const std::string fix = " (add a header row naming the date column and each series)";
  EXPECT_EQ(fixture_error("no_header.csv"),
            "fixtures/ingest/no_header.csv:1:1: the first row starts with the date 2021-01-29 "
            "where a header belongs" +
                fix);
  EXPECT_EQ(
      error_of("2021-02-30,0.01\n"),
      "f.csv:1:1: the first row starts with the date 2021-02-30 where a header belongs" + fix);
  EXPECT_EQ(error_of("date,a,,b\n2021-01,1,2,3\n"),
            "f.csv:1:3: column 3 has no name in the header" + fix);
  EXPECT_EQ(error_of("\ndate,a\n2021-01,0.01\n"),
            "f.csv:1: the first line is blank where the header row belongs (remove the blank "
            "lines above the header row)");
}

TEST(SeriesFileErrors, NameWithALineBreak) {
  EXPECT_EQ(fixture_error("name_with_line_break.csv"),
            "fixtures/ingest/name_with_line_break.csv:1:2: column name 'x\\ny': byte 2 is a "
            "control character (U+000A, a line break) (rename the column in the header: a name "
            "must fit on one line)");
  EXPECT_EQ(error_of("date,a\tb\n2021-01,0.01\n"),
            "f.csv:1:2: column name 'a\\tb': byte 2 is a control character (U+0009, a tab) "
            "(rename the column in the header: a name must fit on one line)");
  // A new name replaces the header's, and is checked instead.
  SeriesFileOptions options = kDecimal;
  options.rename = "ok";
  EXPECT_EQ(parse_fixture("name_with_line_break.csv", options).columns[0].name, "ok");
  options.rename = "a\x01";
  EXPECT_EQ(error_of("date,x\n2021-01,0.01\n", options),
            "f.csv: the new name 'a\\x01': byte 2 is a control character (U+0001) (leave out "
            "control characters, tabs and line breaks: the text must fit on one line)");
}

TEST(SeriesFileErrors, NameThatIsNotStorableText) {
  // Byte N of the name as it is stored: the header cell trimmed of spaces and tabs.
  EXPECT_EQ(error_of("date,  caf\xe9-strat\n2021-01,0.01\n"),
            "f.csv:1:2: column name 'caf\\xe9-strat': byte 4 is not valid UTF-8 (0xe9) (save "
            "the file as UTF-8, or rename the column in the header)");
  EXPECT_EQ(error_of("date,a,\"b\xc2\x85\"\n2021-01,0.01,0.02\n"),
            "f.csv:1:3: column name 'b\\u0085': byte 2 is a control character (U+0085) (rename "
            "the column in the header: a name must fit on one line)");
  EXPECT_EQ(error_of("date,\xc2\xa0"
                     "a\n2021-01,0.01\n"),
            "f.csv:1:2: column name '\xc2\xa0"
            "a': the name begins with white space (U+00A0 at "
            "byte 1) (rename the column in the header without the white space around it)");
  // Columns that are not read are not stored, whatever their names.
  SeriesFileOptions some = kDecimal;
  some.columns = {"a"};
  EXPECT_EQ(error_of("date,a,caf\xe9\n2021-01,0.01,0.02\n", some), "no error");
  // UTF-8 names are kept byte for byte.
  EXPECT_EQ(parse_series_file("f.csv", "date,caf\xc3\xa9-strat\n2021-01,0.01\n", kDecimal)
                .columns[0]
                .name,
            "caf\xc3\xa9-strat");
  // A new name is used as given: blank or with white space around it, it is refused.
  SeriesFileOptions options = kDecimal;
  options.rename = "   ";
  EXPECT_EQ(error_of("date,x\n2021-01,0.01\n", options),
            "f.csv: the new name '   ': the name is blank (give a name with at least one visible "
            "character)");
  options.rename = "x ";
  EXPECT_EQ(error_of("date,x\n2021-01,0.01\n", options),
            "f.csv: the new name 'x ': the name ends with white space (U+0020 at byte 2) (remove "
            "the white space around the name)");
}

TEST(SeriesFileErrors, DuplicateColumnName) {
  EXPECT_EQ(fixture_error("duplicate_column.csv"),
            "fixtures/ingest/duplicate_column.csv:1:4: column name 'alpha' appears twice in the "
            "header (columns 2 and 4) (give each series a unique name in the header row)");
  SeriesFileOptions options = kDecimal;
  options.columns = {"x"};
  EXPECT_EQ(error_of("date,x,y,x\n2021-01,1,2,3\n", options),
            "f.csv:1:4: column name 'x' appears twice in the header (columns 2 and 4) (give "
            "each series a unique name in the header row)");
}

TEST(SeriesFileErrors, RaggedRow) {
  EXPECT_EQ(fixture_error("ragged.csv"),
            "fixtures/ingest/ragged.csv:3: the row has 2 fields but the header has 3 (give every "
            "row one field per header column; leave a cell empty when a value is missing)");
  EXPECT_EQ(error_of("date,a\n2021-01,1,2\n"),
            "f.csv:2: the row has 3 fields but the header has 2 (give every row one field per "
            "header column; leave a cell empty when a value is missing)");
}

TEST(SeriesFileErrors, BlankLineInside) {
  const std::string expected =
      "f.csv:3: the line is blank (remove the blank line between the rows)";
  EXPECT_EQ(error_of("date,a\n2021-01,0.01\n\n2021-02,0.02\n"), expected);
  EXPECT_EQ(error_of("date,a\n2021-01,0.01\n , \n2021-02,0.02\n"), expected);
}

TEST(SeriesFileErrors, BadDates) {
  EXPECT_EQ(fixture_error("bad_date.csv"),
            "fixtures/ingest/bad_date.csv:3:1: '29/02/2021' is not a date (write dates as "
            "YYYY-MM-DD or YYYY-MM)");
  EXPECT_EQ(fixture_error("impossible_date.csv"),
            "fixtures/ingest/impossible_date.csv:3:1: 2021-02-30 is not a calendar date (check "
            "the day and the month)");
  EXPECT_EQ(error_of("date,a\n2021-01,0.01\n,0.02\n"),
            "f.csv:3:1: the date is empty (fill in the date (YYYY-MM-DD or YYYY-MM) or remove "
            "the row)");
}

TEST(SeriesFileErrors, MixedDateForms) {
  EXPECT_EQ(fixture_error("mixed_dates.csv"),
            "fixtures/ingest/mixed_dates.csv:3:1: 2021-02-28 is a full date but line 2 has a "
            "month, 2021-01 (write every date in one form: YYYY-MM-DD or YYYY-MM)");
  EXPECT_EQ(error_of("date,a\n2021-01-31,0.01\n2021-02-28,0.01\n2021-03,0.01\n"),
            "f.csv:4:1: 2021-03 is a month but line 2 has a full date, 2021-01-31 (write every "
            "date in one form: YYYY-MM-DD or YYYY-MM)");
}

TEST(SeriesFileErrors, DuplicateDate) {
  EXPECT_EQ(fixture_error("duplicate_date.csv"),
            "fixtures/ingest/duplicate_date.csv:5:1: date 2021-02-26 appears again; first on "
            "line 3 (keep one row per date)");
  // Out of order too: still the first repeat met when reading, naming the first occurrence.
  EXPECT_EQ(error_of("date,a\n2021-03,0.01\n2021-01,0.01\n2021-02,0.01\n2021-01,0.01\n2021-03,0\n"),
            "f.csv:5:1: date 2021-01 appears again; first on line 3 (keep one row per date)");
}

TEST(SeriesFileErrors, BadNumbers) {
  EXPECT_EQ(fixture_error("bad_number.csv"),
            "fixtures/ingest/bad_number.csv:3:3: 'abc' is not a number (write plain numbers such "
            "as 0.0123 or -1.5e-3; leave the cell empty or write NA when a value is missing)");
  EXPECT_EQ(error_of("date,a\n2021-01,1.5%\n", kPercent),
            "f.csv:2:2: '1.5%' is not a number (drop the percent sign and pass --percent)");
  EXPECT_EQ(error_of("date,a\n2021-01,0.01 0.02\n"),
            "f.csv:2:2: '0.01 0.02' is not a number (write plain numbers such as 0.0123 or "
            "-1.5e-3; leave the cell empty or write NA when a value is missing)");
}

TEST(SeriesFileErrors, NotFinite) {
  const std::string fix = " (leave the cell empty or write NA when a value is missing)";
  EXPECT_EQ(fixture_error("nan_value.csv"),
            "fixtures/ingest/nan_value.csv:3:2: 'NaN' is not a finite number" + fix);
  EXPECT_EQ(fixture_error("infinite_value.csv"),
            "fixtures/ingest/infinite_value.csv:3:2: 'inf' is not a finite number" + fix);
  EXPECT_EQ(error_of("date,a\n2021-01,-Infinity\n"),
            "f.csv:2:2: '-Infinity' is not a finite number" + fix);
  EXPECT_EQ(error_of("date,a\n2021-01,1e999\n"), "f.csv:2:2: '1e999' is not a finite number" + fix);
  EXPECT_EQ(error_of("date,1M\n2021-01,nan\n", kRatePercent),
            "f.csv:2:2: 'nan' is not a finite number" + fix);
}

TEST(SeriesFileErrors, ReturnOfMinusHundredPercentOrLess) {
  EXPECT_EQ(fixture_error("total_loss.csv"),
            "fixtures/ingest/total_loss.csv:3:2: return -1.0 is -100% or less (check the value, "
            "a simple return must be above -1; if the file states percent, pass --percent; if it "
            "states prices, pass --levels)");
  EXPECT_EQ(error_of("date,a\n2021-01,-100\n", kPercent),
            "f.csv:2:2: return -100% is -100% or less (check the value, a simple return must be "
            "above -100%)");
  // Just above -100% is a valid, if dreadful, return.
  EXPECT_EQ(error_of("date,a\n2021-01,-99.9\n2021-02,1\n2021-03,2\n", kPercent), "no error");
}

TEST(SeriesFileErrors, LevelZeroOrBelow) {
  EXPECT_EQ(fixture_error("negative_level.csv", kLevels),
            "fixtures/ingest/negative_level.csv:3:2: level 0 is zero or below (levels (prices, "
            "NAV) must be positive; if these are returns, leave out --levels)");
  EXPECT_EQ(error_of("date,nav\n2021-01,100\n", kLevels),
            "f.csv:1:2: column 'nav' has no return: it needs two levels on consecutive rows "
            "(fill it in, or leave it out with --columns)");
}

TEST(SeriesFileErrors, ReturnFromLevelsOfMinusHundredPercentOrNotFinite) {
  // Valid levels can still give returns that are no returns: 100 -> 1e-300 rounds to -1 (a
  // loss of everything) and 1e-300 -> 1e300 overflows. Each names the level that produced it.
  const std::string text = "month,lvl\n2020-01,100\n2020-02,1e-300\n2020-03,1e300\n2020-04,100\n";
  EXPECT_EQ(error_of(text, kLevels),
            "f.csv:3:2: level 1e-300 after 100 on line 2 gives a return of -100% or less (check "
            "the level: a simple return must be above -100%)");
  EXPECT_EQ(error_of("month,lvl\n2020-01,1e-300\n2020-02,1e300\n", kLevels),
            "f.csv:3:2: level 1e+300 after 1e-300 on line 2 gives a return too large to "
            "represent (check the levels)");
  // The rows are taken in date order: the level before is the one of the month before.
  EXPECT_EQ(error_of("month,lvl\n2020-02,1e-300\n2020-01,100\n2020-03,1\n", kLevels),
            "f.csv:2:2: level 1e-300 after 100 on line 3 gives a return of -100% or less (check "
            "the level: a simple return must be above -100%)");
  // A missing level in between gives a missing return, not one across the gap.
  EXPECT_EQ(error_of("month,lvl\n2020-01,100\n2020-02,\n2020-03,1e-300\n2020-04,1e-300\n", kLevels),
            "no error");
}

TEST(SeriesFileErrors, ReturnAboveOneThousandPercent) {
  // One period's return above +1,000% (10 as a decimal) is almost surely a wrong value or a
  // wrong unit; a return that is right needs allow_large_returns.
  EXPECT_EQ(error_of("date,a\n2021-01,0.01\n2021-02,12.5\n2021-03,-0.02\n"),
            "f.csv:3:2: return 12.5 (+1250%) is above +1,000% in one period (check the value; if "
            "the file states percent, pass --percent; if the return is right, pass "
            "--allow-large-returns)");
  EXPECT_EQ(error_of("date,a\n2021-01,0.01\n2021-02,1e300\n2021-03,-0.02\n"),
            "f.csv:3:2: return 1e+300 (+1e+302%) is above +1,000% in one period (check the "
            "value; if the file states percent, pass --percent; if the return is right, pass "
            "--allow-large-returns)");
  EXPECT_EQ(error_of("date,a\n2021-01,1\n2021-02,1500\n2021-03,-2\n", kPercent),
            "f.csv:3:2: return 1500% is above +1,000% in one period (check the value; if the "
            "return is right, pass --allow-large-returns)");
  EXPECT_EQ(error_of("date,px\n2021-01,100\n2021-02,100\n2021-03,1200\n", kLevels),
            "f.csv:4:2: level 1200 after 100 on line 3 gives a return of +1100%, above +1,000% "
            "in one period (check the level; if it is right, pass --allow-large-returns)");
  SeriesFileOptions factor = options_for(SeriesKind::factor, ValueUnit::decimal);
  EXPECT_EQ(error_of("date,smb\n2021-01,0.01\n2021-02,11\n2021-03,-0.02\n", factor),
            "f.csv:3:2: return 11 (+1100%) is above +1,000% in one period (check the value; if "
            "the file states percent, pass --percent; if the return is right, pass "
            "--allow-large-returns)");
  // +1,000% itself is allowed, and so is anything with the option.
  EXPECT_EQ(error_of("date,a\n2021-01,0.01\n2021-02,10\n2021-03,-0.02\n"), "no error");
  EXPECT_EQ(error_of("date,px\n2021-01,100\n2021-02,1100\n", kLevels), "no error");
  for (SeriesFileOptions options : {kDecimal, factor}) {
    options.allow_large_returns = true;
    const SeriesFile file =
        parse_series_file("f.csv", "date,a\n2021-01,0.01\n2021-02,1e300\n2021-03,-0.02\n", options);
    EXPECT_EQ(file.columns[0].values, (std::vector<double>{0.01, 1e300, -0.02}));
  }
  SeriesFileOptions levels = kLevels;
  levels.allow_large_returns = true;
  EXPECT_EQ(parse_series_file("f.csv", "date,px\n2021-01,0.01\n2021-02,1e300\n", levels)
                .columns[0]
                .values,
            (std::vector<double>{1e300 / 0.01 - 1}));
  // Rates keep their own plausible range, which refuses absurd yields.
  EXPECT_EQ(error_of("date,1M\n2021-01,4\n2021-02,1e300\n", kRatePercent),
            "f.csv:3:2: rate 1e300 is outside the plausible range -5 to 50 (percent) (check the "
            "value; if the file states decimals (0.05 for 5%), pass --decimal)");
}

TEST(SeriesFileErrors, LooksLikePercentOrLevels) {
  // |1.5|, |2.3|, |-0.4|, |3.1|, |0.8|: median 1.5.
  EXPECT_EQ(fixture_error("looks_like_percent.csv"),
            "fixtures/ingest/looks_like_percent.csv:1:2: column 'alpha' looks like percent "
            "(median |value| 1.5) (pass --percent, or --levels if these are prices)");
  // A percent loss of 1% or more, read as decimal, is caught on its cell first.
  EXPECT_EQ(error_of("date,a\n2021-01,1.5\n2021-02,-2.3\n"),
            "f.csv:3:2: return -2.3 is -100% or less (check the value, a simple return must be "
            "above -1; if the file states percent, pass --percent; if it states prices, pass "
            "--levels)");
  // 100, 101.5, 99.8: all positive, median 100.
  EXPECT_EQ(fixture_error("looks_like_levels.csv"),
            "fixtures/ingest/looks_like_levels.csv:1:2: column 'alpha' looks like levels, not "
            "returns (all values positive, median 100) (pass --levels if these are prices, or "
            "--percent if they are percent returns)");
  EXPECT_EQ(fixture_error("looks_like_levels.csv", kPercent),
            "fixtures/ingest/looks_like_levels.csv:1:2: column 'alpha' looks like levels, not "
            "percent returns (median |value| 100) (pass --levels if these are prices)");
  EXPECT_EQ(fixture_error("looks_like_levels.csv", kLevels), "no error");
  // Even count: median of |0.5|, |0.9|, |1.2|, |2| is (0.9 + 1.2) / 2 = 1.05 > 1.
  EXPECT_EQ(error_of("date,a\n2021-01,0.5\n2021-02,-0.9\n2021-03,1.2\n2021-04,2\n"),
            "f.csv:1:2: column 'a' looks like percent (median |value| 1.05) (pass --percent, or "
            "--levels if these are prices)");
  // Median of |0.5|, |0.7|, |1.2|, |2| is 0.95: plausible (if wild) decimal returns.
  EXPECT_EQ(error_of("date,a\n2021-01,0.5\n2021-02,-0.7\n2021-03,1.2\n2021-04,2\n"), "no error");
}

TEST(SeriesFileErrors, RateOutOfRange) {
  EXPECT_EQ(fixture_error("rate_out_of_range.csv", kRatePercent),
            "fixtures/ingest/rate_out_of_range.csv:3:2: rate 450 is outside the plausible range "
            "-5 to 50 (percent) (check the value; if the file states decimals (0.05 for 5%), pass "
            "--decimal)");
  EXPECT_EQ(error_of("date,1M\n2021-01,0.04\n2021-02,4.5\n", kRateDecimal),
            "f.csv:3:2: rate 4.5 is outside the plausible range -0.05 to 0.5 (decimal) (check "
            "the value; if the file states percent (5 for 5%), leave out --decimal)");
  EXPECT_EQ(error_of("date,1M\n2021-01,-0.5\n", kRatePercent), "no error");  // negative rates exist
}

TEST(SeriesFileErrors, RateColumnNotATenor) {
  EXPECT_EQ(fixture_error("rate_not_tenor.csv", kRatePercent),
            "fixtures/ingest/rate_not_tenor.csv:1:2: rate column 'bill_yield' is not a tenor "
            "(name each rate column by its tenor, a number and D, W, M or Y (1M, 3M, 13W, 1Y), "
            "or give the tenor of a single-column file with --tenor)");
  SeriesFileOptions options = kRatePercent;
  options.rename = "month";
  EXPECT_EQ(error_of("date,x\n2021-01,4\n", options),
            "f.csv: 'month' is not a tenor (give a tenor: a number and D, W, M or Y, such as "
            "1M, 3M, 13W, 1Y)");
}

TEST(SeriesFileErrors, ColumnWithoutValues) {
  EXPECT_EQ(fixture_error("empty_column.csv"),
            "fixtures/ingest/empty_column.csv:1:3: column 'beta' has no values (fill it in, or "
            "leave it out with --columns)");
}

TEST(SeriesFileErrors, UnterminatedQuote) {
  EXPECT_EQ(fixture_error("unterminated_quote.csv"),
            "fixtures/ingest/unterminated_quote.csv:2:2: a quoted field is never closed (add the "
            "closing quote; write a quote inside a field as \"\")");
}

TEST(SeriesFileErrors, UnknownColumns) {
  SeriesFileOptions options = kDecimal;
  options.date_column = "when";
  EXPECT_EQ(error_of("date,a\n2021-01,0.01\n", options),
            "f.csv:1: no column named 'when'; the header has: date, a (pass --date-column with "
            "one of these names)");
  options = kDecimal;
  options.columns = {"a", "zz"};
  EXPECT_EQ(error_of("date,a,b\n2021-01,0.01,0.02\n", options),
            "f.csv:1: no column named 'zz'; the header has: date, a, b (pass --columns with "
            "names from the header)");
  options.columns = {"date"};
  EXPECT_EQ(error_of("date,a,b\n2021-01,0.01,0.02\n", options),
            "f.csv:1:1: 'date' is the date column, not a series (leave it out of --columns)");
}

TEST(SeriesFileErrors, NoValueColumns) {
  EXPECT_EQ(error_of("date\n2021-01\n"),
            "f.csv:1: the header names only the date column (add a column for each series next "
            "to the date column)");
}

TEST(SeriesFileErrors, RenameNeedsASingleColumn) {
  SeriesFileOptions options = kDecimal;
  options.rename = "momentum";
  EXPECT_EQ(error_of("date,a,b\n2021-01,0.01,0.02\n", options),
            "f.csv: a new name fits a single series, but the file has 2: a, b (pick one column "
            "with --columns, or keep the names of the header)");
}

TEST(SeriesFileErrors, RatesAreNotLevels) {
  SeriesFileOptions options = options_for(SeriesKind::rate, ValueUnit::levels);
  EXPECT_THROW(parse_series_file("f.csv", "date,1M\n2021-01,4\n", options), Error);
}

// ---- threads -----------------------------------------------------------------------------

// A wide daily file: columns that start late or stop early, interior gaps, two rows out of
// order, CRLF line ends and blank trailing lines.
std::string wide_file(std::size_t columns, std::size_t rows, bool levels, unsigned seed) {
  std::mt19937 rng(seed);
  std::normal_distribution<double> move(0.0004, 0.01);
  std::uniform_int_distribution<int> pick(0, 99);
  std::string text = "date";
  for (std::size_t c = 0; c < columns; ++c) text += ",s" + std::to_string(c);
  text += "\r\n";
  std::vector<double> level(columns, 100.0);
  Day d = day("2000-01-03");
  std::vector<Day> days;
  while (days.size() < rows) {
    if (weekday(d) < 5) days.push_back(d);
    ++d;
  }
  std::swap(days[rows / 3], days[rows / 3 + 1]);
  for (std::size_t r = 0; r < rows; ++r) {
    text += format_date(days[r]);
    for (std::size_t c = 0; c < columns; ++c) {
      text += ',';
      const bool before_start = r < (c % 17) * 11;
      const bool after_end = rows - r <= (c % 5) * 7;
      if (before_start || after_end || pick(rng) == 0) {
        if (pick(rng) < 50) text += "NA";
        continue;
      }
      const double r_t = move(rng);
      level[c] *= 1 + r_t;
      char buffer[32];
      const int n = std::snprintf(buffer, sizeof buffer, "%.6f", levels ? level[c] : r_t * 100);
      text.append(buffer, static_cast<std::size_t>(n));
    }
    text += "\r\n";
  }
  return text + "\r\n,,\r\n";
}

TEST(SeriesFileThreads, SplitRowsGiveTheSingleThreadedResult) {
  for (const bool levels : {false, true}) {
    const std::string text = wide_file(200, 3000, levels, 7);
    SeriesFileOptions options = levels ? kLevels : kPercent;
    options.threads = 1;
    const SeriesFile single = parse_series_file("wide.csv", text, options);
    ASSERT_EQ(single.columns.size(), 200u);
    EXPECT_EQ(single.notes.size(), 1u);
    for (const unsigned threads : {2u, 3u, 4u, 16u}) {
      options.threads = threads;
      EXPECT_TRUE(same(parse_series_file("wide.csv", text, options), single))
          << threads << " threads, levels " << levels;
    }
    options.threads = 0;  // automatic
    EXPECT_TRUE(same(parse_series_file("wide.csv", text, options), single));
  }
}

TEST(SeriesFileThreads, ReportTheSameErrorAsOneThread) {
  std::string text = wide_file(50, 2000, false, 11);
  // Spoil a cell near the end and one near the start: the first in the file wins.
  const auto spoil = [&](std::size_t from, const std::string& bad) {
    const std::size_t at = text.find(",-", from);
    ASSERT_NE(at, std::string::npos);
    text.replace(at + 1, 1, bad);
  };
  spoil(text.size() * 9 / 10, "x");
  SeriesFileOptions options = kPercent;
  std::string expected;
  for (const unsigned threads : {1u, 2u, 3u, 8u}) {
    options.threads = threads;
    const std::string message = [&] {
      try {
        parse_series_file("wide.csv", text, options);
      } catch (const InputError& e) {
        return std::string(e.what());
      }
      return std::string("no error");
    }();
    if (threads == 1) {
      expected = message;
      EXPECT_NE(expected.find("is not a number"), std::string::npos) << expected;
    }
    EXPECT_EQ(message, expected) << threads << " threads";
  }
  spoil(text.size() / 10, "y");
  for (const unsigned threads : {1u, 2u, 3u, 8u}) {
    options.threads = threads;
    try {
      parse_series_file("wide.csv", text, options);
      ADD_FAILURE() << "no error";
    } catch (const InputError& e) {
      if (threads == 1) expected = e.what();
      EXPECT_EQ(std::string(e.what()), expected) << threads << " threads";
      EXPECT_NE(expected.find("'y"), std::string::npos) << expected;
    }
  }
}

}  // namespace
}  // namespace alphatrail::core
