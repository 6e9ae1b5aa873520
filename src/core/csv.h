// An RFC 4180 CSV reader over a buffer that holds the whole file. It hands out one record at a
// time as string views, so reading allocates nothing per field; only quoted fields with ""
// escapes are copied (unescaped) into storage the reader owns.
//
// Ownership: the caller owns the buffer and keeps it alive while the reader and the views it
// returned are in use. A record's views stay valid until the next call of next() on the same
// reader. Failure: a malformed quote throws InputError naming FILE:LINE:COLUMN, where LINE is
// the physical line (1-based; the header is line 1; a quoted field with a line end spans lines)
// and COLUMN the 1-based field index.
//
// Accepted: comma separator, CRLF or LF line ends, a UTF-8 byte-order mark at the start, a final
// record with or without a line end. Trailing lines that hold nothing but blanks and commas are
// ignored (spreadsheet exports leave them); blank lines inside the file are returned as records.
#pragma once

#include <cstddef>
#include <deque>
#include <string>
#include <string_view>
#include <vector>

namespace alphatrail::core {

// One record of a CSV file.
struct CsvRecord {
  std::vector<std::string_view> fields;  // unquoted and unescaped field text
  long line = 0;                         // physical line the record starts on (1-based)
};

// Reads records from a buffer, one at a time, in file order.
class CsvReader {
 public:
  // Creates a reader over `content`; `file_name` is used in error messages.
  // Example: CsvReader reader("prices.csv", text); CsvRecord r; while (reader.next(r)) {...}
  CsvReader(std::string file_name, std::string_view content);

  // Reads the next record into `record`; returns false at the end of the input.
  // Example: if (!reader.next(header)) throw ...;  // empty file
  bool next(CsvRecord& record);

  // Returns true when the unread input has no quote character: every line end is then a
  // record end, and split() may be used.
  // Example: if (reader.rest_is_unquoted()) parts = reader.split(2);
  bool rest_is_unquoted() const;

  // Splits the unread input into at most `parts` readers over consecutive runs of whole lines,
  // each knowing its first line number; together they return exactly the records this reader
  // would. Only valid when rest_is_unquoted(). The readers may be used on separate threads.
  // Example: auto parts = reader.split(std::thread::hardware_concurrency());
  std::vector<CsvReader> split(std::size_t parts) const;

  // Returns the unread bytes (for sizing buffers).
  // Example: std::count(r.rest().begin(), r.rest().end(), '\n')
  std::string_view rest() const { return {pos_, static_cast<std::size_t>(end_ - pos_)}; }

  // Returns the number of line ends in the unread input: an upper bound of the records left
  // (one more when the last line has no line end).
  // Example: rows.reserve(reader.count_line_ends() + 1);
  std::size_t count_line_ends() const;

  // Returns the line the next record starts on.
  long line() const { return line_; }

 private:
  bool only_blanks_follow(const char* p);

  std::string file_name_;
  const char* pos_ = nullptr;
  const char* end_ = nullptr;        // end of this reader's part
  const char* file_end_ = nullptr;   // end of the whole file: trailing blanks are judged on it
  const char* next_data_ = nullptr;  // a byte that is no blank, found by looking ahead
  long line_ = 1;
  std::deque<std::string> unescaped_;  // a deque keeps earlier strings in place as it grows
};

// A whole CSV file with owned fields (convenient for small files and tests).
struct CsvTable {
  std::vector<std::vector<std::string>> rows;  // the header is rows[0]
  std::vector<long> lines;                     // line each row starts on
};

// Reads a whole CSV file into a table.
// Example: read_csv_table("a.csv", "d,x\n2021-01,1\n").rows[1][1] == "1"
CsvTable read_csv_table(const std::string& file_name, std::string_view content);

}  // namespace alphatrail::core
