// Output helpers shared by the commands: the --format choice, aligned text tables, RFC 4180
// CSV and JSON. Data goes to stdout; diagnostics to stderr.
#pragma once

#include <nlohmann/json.hpp>
#include <ostream>
#include <string>
#include <vector>

namespace CLI {
class App;
class Option;
}  // namespace CLI

namespace alphatrail::cli {

enum class Format { table, json, csv };

// Adds the --format table|json|csv option to a command.
CLI::Option* add_format_option(CLI::App& command, Format& format);

// A rectangular result: a header and rows of cells, printed as a table or CSV.
struct Table {
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
  std::vector<bool> right_aligned;  // per column; numbers read best right-aligned
};

// Prints a table with aligned columns and a rule under the header.
void print_table(std::ostream& out, const Table& table);

// Prints a table whose rows arrive one at a time, for results too long to hold. The column
// widths and alignment come from the header and the first kSampleRows rows, which are held
// until then and printed as print_table would print them; every later row is printed at once
// with the same widths, a wider cell just extending its line. (Widths from all rows would mean
// holding all rows; widths from the header alone would misalign almost every column.)
//   StreamedTable t(std::cout, {"x", "name"});
//   t.add({"1", "a"}, {true, false});
//   t.finish();
class StreamedTable {
 public:
  static constexpr std::size_t kSampleRows = 200;

  StreamedTable(std::ostream& out, std::vector<std::string> header);
  // Adds a row; `numbers` marks its cells that hold numbers (a column with a number among the
  // sample rows is right-aligned).
  void add(std::vector<std::string> row, const std::vector<bool>& numbers);
  // Prints the header and the rows still held; call once after the last row.
  void finish();
  // Returns true while rows are held back for the widths (nothing printed yet).
  bool holding() const { return !printed_; }

 private:
  void print_sample();
  std::ostream& out_;
  Table sample_;
  std::vector<std::size_t> widths_;  // set when the sample is printed
  bool printed_ = false;
};

// Prints a table as RFC 4180 CSV (header row first, CRLF not used: LF line ends).
void print_csv(std::ostream& out, const Table& table);

// Prints one row of CSV: the fields quoted where needed, joined by commas, and a line end.
void print_csv_row(std::ostream& out, const std::vector<std::string>& row);

// Quotes one CSV field when it needs it (comma, quote, line break).
std::string csv_field(const std::string& text);

// Prints JSON with two-space indentation and a final newline.
void print_json(std::ostream& out, const nlohmann::ordered_json& value);

// Returns a JSON number, or null for NaN and infinities (which JSON cannot hold).
nlohmann::ordered_json json_number(double value);

}  // namespace alphatrail::cli
