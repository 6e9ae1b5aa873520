#include "core/csv.h"

#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "core/error.h"

namespace alphatrail::core {
namespace {

using Rows = std::vector<std::vector<std::string>>;

Rows rows_of(std::string_view text) {
  return read_csv_table("t.csv", text).rows;
}

std::vector<long> lines_of(std::string_view text) {
  return read_csv_table("t.csv", text).lines;
}

std::string error_of(std::string_view text) {
  try {
    read_csv_table("t.csv", text);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

TEST(Csv, ReadsHeaderAndRecords) {
  EXPECT_EQ(rows_of("date,a,b\n2021-01,1,2\n2021-02,3,4\n"),
            (Rows{{"date", "a", "b"}, {"2021-01", "1", "2"}, {"2021-02", "3", "4"}}));
  EXPECT_EQ(lines_of("date,a,b\n2021-01,1,2\n2021-02,3,4\n"), (std::vector<long>{1, 2, 3}));
}

TEST(Csv, KeepsEmptyFields) {
  EXPECT_EQ(rows_of("a,,b\nx,,\ny,1,"), (Rows{{"a", "", "b"}, {"x", "", ""}, {"y", "1", ""}}));
}

TEST(Csv, ReadsFinalLineWithOrWithoutLineEnd) {
  EXPECT_EQ(rows_of("a,b\n1,2"), (Rows{{"a", "b"}, {"1", "2"}}));
  EXPECT_EQ(rows_of("a,b\n1,2\n"), (Rows{{"a", "b"}, {"1", "2"}}));
  EXPECT_EQ(rows_of("a,b\r\n1,2\r\n"), (Rows{{"a", "b"}, {"1", "2"}}));
  EXPECT_EQ(rows_of("a,b\r\n1,2\r"), (Rows{{"a", "b"}, {"1", "2"}}));
}

TEST(Csv, AcceptsCrlfAndLfLineEnds) {
  EXPECT_EQ(rows_of("a,b\r\n1,2\n3,4\r\n"), (Rows{{"a", "b"}, {"1", "2"}, {"3", "4"}}));
  EXPECT_EQ(lines_of("a,b\r\n1,2\n3,4\r\n"), (std::vector<long>{1, 2, 3}));
  // A carriage return that does not end a line is data.
  EXPECT_EQ(rows_of("a\rb,c\n"), (Rows{{"a\rb", "c"}}));
}

TEST(Csv, SkipsByteOrderMark) {
  EXPECT_EQ(rows_of("\xEF\xBB\xBF"
                    "date,a\n2021-01,1\n"),
            (Rows{{"date", "a"}, {"2021-01", "1"}}));
  EXPECT_EQ(lines_of("\xEF\xBB\xBF"
                     "date,a\n2021-01,1\n"),
            (std::vector<long>{1, 2}));
  // Only at the start: elsewhere the bytes are data.
  EXPECT_EQ(rows_of("a\n\xEF\xBB\xBF"
                    "b\n"),
            (Rows{{"a"},
                  {"\xEF\xBB\xBF"
                   "b"}}));
}

TEST(Csv, ReadsQuotedFieldsWithCommasEscapesAndLineEnds) {
  const std::string text =
      "name,note\n"
      "\"Fund, A\",\"say \"\"hi\"\"\"\n"
      "\"two\nlines\",\"crlf\r\ninside\"\r\n"
      "\"\",plain\n"
      "last,\"\"\"\"";
  EXPECT_EQ(rows_of(text), (Rows{{"name", "note"},
                                 {"Fund, A", "say \"hi\""},
                                 {"two\nlines", "crlf\r\ninside"},
                                 {"", "plain"},
                                 {"last", "\""}}));
  // The record of line 3 holds two line ends inside quotes, so it spans lines 3 to 5 and the
  // next record starts on line 6.
  EXPECT_EQ(lines_of(text), (std::vector<long>{1, 2, 3, 6, 7}));
}

TEST(Csv, KeepsEscapedFieldsOfOneRecordApart) {
  // Several unescaped fields in one record must not overwrite each other's storage.
  CsvReader reader("t.csv", "\"a\"\"1\",\"b\"\"2\",\"c\"\"3\",\"d\"\"4\",\"e\"\"5\"\n");
  CsvRecord record;
  ASSERT_TRUE(reader.next(record));
  EXPECT_EQ(std::vector<std::string>(record.fields.begin(), record.fields.end()),
            (std::vector<std::string>{"a\"1", "b\"2", "c\"3", "d\"4", "e\"5"}));
  EXPECT_FALSE(reader.next(record));
}

TEST(Csv, IgnoresTrailingBlankLines) {
  EXPECT_EQ(rows_of("a,b\n1,2\n\n\n"), (Rows{{"a", "b"}, {"1", "2"}}));
  EXPECT_EQ(rows_of("a,b\r\n1,2\r\n\r\n  \r\n"), (Rows{{"a", "b"}, {"1", "2"}}));
  // Spreadsheet exports leave rows of bare separators.
  EXPECT_EQ(rows_of("a,b\n1,2\n,\n,,,\n"), (Rows{{"a", "b"}, {"1", "2"}}));
}

TEST(Csv, ReturnsBlankLinesInsideTheFile) {
  EXPECT_EQ(rows_of("a,b\n\n1,2\n"), (Rows{{"a", "b"}, {""}, {"1", "2"}}));
  EXPECT_EQ(lines_of("a,b\n\n1,2\n"), (std::vector<long>{1, 2, 3}));
  EXPECT_EQ(rows_of("a,b\n,\n1,2\n"), (Rows{{"a", "b"}, {"", ""}, {"1", "2"}}));
}

TEST(Csv, ReadsLongRunsOfBlankLinesInLinearTime) {
  const std::string text = "a\n" + std::string(200000, '\n') + "b\n" + std::string(1000, '\n');
  const CsvTable table = read_csv_table("t.csv", text);
  ASSERT_EQ(table.rows.size(), 200002u);  // the header, 200000 blank records, "b"
  EXPECT_EQ(table.rows.back(), (std::vector<std::string>{"b"}));
  EXPECT_EQ(table.lines.back(), 200002);
}

TEST(Csv, ReadsNothingFromEmptyInput) {
  EXPECT_TRUE(rows_of("").empty());
  EXPECT_TRUE(rows_of("\xEF\xBB\xBF").empty());
  EXPECT_TRUE(rows_of(" \r\n\n\t\n").empty());
}

TEST(Csv, RejectsUnterminatedQuoteAtItsLine) {
  EXPECT_EQ(error_of("date,a\n2021-01,\"1\n2021-02,2\n"),
            "t.csv:2:2: a quoted field is never closed (add the closing quote; write a quote "
            "inside a field as \"\")");
}

TEST(Csv, RejectsStrayQuotes) {
  EXPECT_EQ(error_of("a,b\n1,\"2\"x\n"),
            "t.csv:2:2: text follows the closing quote of a field (put quotes around the whole "
            "field and write a quote inside it as \"\")");
  EXPECT_EQ(error_of("a,b\n1,2\"x\n"),
            "t.csv:2:2: a quote inside an unquoted field (put quotes around the whole field and "
            "write a quote inside it as \"\")");
}

TEST(Csv, CountsLineEnds) {
  CsvReader reader("t.csv", "a\n1\n2");
  EXPECT_EQ(reader.count_line_ends(), 2u);
  CsvRecord record;
  ASSERT_TRUE(reader.next(record));
  EXPECT_EQ(reader.count_line_ends(), 1u);
  EXPECT_EQ(reader.line(), 2);
}

TEST(Csv, SplitReadsTheSameRecordsAsOneReader) {
  // Lines of varied length, interior blank lines, a final line without a line end and then
  // trailing blanks in a second variant.
  std::string body;
  for (int i = 0; i < 997; ++i) {
    if (i % 101 == 50) body += "\n";
    body += std::to_string(i) + "," + std::string(static_cast<std::size_t>(i % 13), 'x') + ",z\n";
  }
  for (const std::string& text :
       {"h1,h2,h3\n" + body + "end,1,2", "h1,h2,h3\n" + body + "\n ,\n"}) {
    CsvReader whole("t.csv", text);
    CsvRecord record;
    ASSERT_TRUE(whole.next(record));  // header
    ASSERT_TRUE(whole.rest_is_unquoted());
    std::vector<std::pair<long, std::vector<std::string>>> expected;
    CsvReader single = whole;
    while (single.next(record))
      expected.emplace_back(record.line,
                            std::vector<std::string>(record.fields.begin(), record.fields.end()));
    for (std::size_t parts : {1u, 2u, 3u, 7u, 64u}) {
      std::vector<std::pair<long, std::vector<std::string>>> got;
      std::vector<CsvReader> readers = whole.split(parts);
      EXPECT_LE(readers.size(), parts);
      for (auto& reader : readers)
        while (reader.next(record))
          got.emplace_back(record.line,
                           std::vector<std::string>(record.fields.begin(), record.fields.end()));
      EXPECT_EQ(got, expected) << parts << " parts";
    }
  }
}

TEST(Csv, DetectsQuotesBeforeSplitting) {
  CsvReader reader("t.csv", "a,b\n1,\"2\"\n");
  CsvRecord record;
  ASSERT_TRUE(reader.next(record));
  EXPECT_FALSE(reader.rest_is_unquoted());
  CsvReader header_only_quoted("t.csv", "\"a\",b\n1,2\n");
  ASSERT_TRUE(header_only_quoted.next(record));
  EXPECT_TRUE(header_only_quoted.rest_is_unquoted());
}

}  // namespace
}  // namespace alphatrail::core
