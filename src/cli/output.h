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

// Prints a table as RFC 4180 CSV (header row first, CRLF not used: LF line ends).
void print_csv(std::ostream& out, const Table& table);

// Quotes one CSV field when it needs it (comma, quote, line break).
std::string csv_field(const std::string& text);

// Prints JSON with two-space indentation and a final newline.
void print_json(std::ostream& out, const nlohmann::ordered_json& value);

// Returns a JSON number, or null for NaN and infinities (which JSON cannot hold).
nlohmann::ordered_json json_number(double value);

}  // namespace alphatrail::cli
