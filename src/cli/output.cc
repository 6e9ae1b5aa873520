#include "cli/output.h"

#include <CLI/CLI.hpp>
#include <algorithm>
#include <cmath>
#include <map>

#include "cli/choices.h"

namespace alphatrail::cli {

CLI::Option* add_format_option(CLI::App& command, Format& format) {
  // Only the names: a number such as 1 is refused, not taken as the enum's value.
  return add_choice_option<Format>(
      command, "--format", {{"table", Format::table}, {"json", Format::json}, {"csv", Format::csv}},
      [&format](const Format& f) { format = f; }, "Output: table (default), json or csv", "table",
      true);
}

namespace {

// Counts display columns: UTF-8 continuation bytes take no room of their own.
std::size_t display_width(const std::string& text) {
  return static_cast<std::size_t>(std::count_if(text.begin(), text.end(), [](char c) {
    return (static_cast<unsigned char>(c) & 0xC0) != 0x80;
  }));
}

}  // namespace

namespace {

std::vector<std::size_t> column_widths(const Table& table) {
  std::vector<std::size_t> widths(table.header.size(), 0);
  for (std::size_t c = 0; c < table.header.size(); ++c) widths[c] = display_width(table.header[c]);
  for (const auto& row : table.rows)
    for (std::size_t c = 0; c < row.size() && c < widths.size(); ++c)
      widths[c] = std::max(widths[c], display_width(row[c]));
  return widths;
}

// Prints one line of a table; a cell wider than its column pushes the rest of the line right.
void print_table_row(std::ostream& out, const std::vector<std::size_t>& widths,
                     const std::vector<bool>& right_aligned, const std::vector<std::string>& row) {
  std::string line;
  for (std::size_t c = 0; c < widths.size(); ++c) {
    const std::string& cell = c < row.size() ? row[c] : std::string();
    const std::size_t width = display_width(cell);
    const std::string pad(width < widths[c] ? widths[c] - width : 0, ' ');
    const bool right = c < right_aligned.size() && right_aligned[c];
    if (c > 0) line += "  ";
    line += right ? pad + cell : cell + pad;
  }
  while (!line.empty() && line.back() == ' ') line.pop_back();
  line += '\n';
  out.write(line.data(), static_cast<std::streamsize>(line.size()));
}

void print_table_head(std::ostream& out, const std::vector<std::size_t>& widths,
                      const Table& table) {
  print_table_row(out, widths, table.right_aligned, table.header);
  std::string rule;
  for (std::size_t c = 0; c < widths.size(); ++c) {
    if (c > 0) rule += "  ";
    rule += std::string(widths[c], '-');
  }
  out << rule << '\n';
}

}  // namespace

void print_table(std::ostream& out, const Table& table) {
  const auto widths = column_widths(table);
  print_table_head(out, widths, table);
  for (const auto& row : table.rows) print_table_row(out, widths, table.right_aligned, row);
}

StreamedTable::StreamedTable(std::ostream& out, std::vector<std::string> header) : out_(out) {
  sample_.right_aligned.assign(header.size(), false);
  sample_.header = std::move(header);
}

void StreamedTable::add(std::vector<std::string> row, const std::vector<bool>& numbers) {
  if (!holding()) {
    print_table_row(out_, widths_, sample_.right_aligned, row);
    return;
  }
  for (std::size_t c = 0; c < numbers.size() && c < sample_.right_aligned.size(); ++c)
    if (numbers[c]) sample_.right_aligned[c] = true;
  sample_.rows.push_back(std::move(row));
  if (sample_.rows.size() == kSampleRows) print_sample();
}

void StreamedTable::finish() {
  if (holding()) print_sample();
}

void StreamedTable::print_sample() {
  widths_ = column_widths(sample_);
  printed_ = true;
  print_table(out_, sample_);
  sample_.rows.clear();
  sample_.rows.shrink_to_fit();
}

std::string csv_field(const std::string& text) {
  if (text.find_first_of(",\"\r\n") == std::string::npos) return text;
  std::string quoted = "\"";
  for (char c : text) {
    if (c == '"') quoted += '"';
    quoted += c;
  }
  return quoted + '"';
}

void print_csv_row(std::ostream& out, const std::vector<std::string>& row) {
  std::string line;
  for (std::size_t c = 0; c < row.size(); ++c) {
    if (c > 0) line += ',';
    line += csv_field(row[c]);
  }
  line += '\n';
  out.write(line.data(), static_cast<std::streamsize>(line.size()));
}

void print_csv(std::ostream& out, const Table& table) {
  print_csv_row(out, table.header);
  for (const auto& row : table.rows) print_csv_row(out, row);
}

void print_json(std::ostream& out, const nlohmann::ordered_json& value) {
  // Stored text is UTF-8 by the ingest rules; anything else (a ledger edited outside
  // alphatrail) prints as U+FFFD instead of failing the whole listing.
  out << value.dump(2, ' ', false, nlohmann::json::error_handler_t::replace) << '\n';
}

nlohmann::ordered_json json_number(double value) {
  if (!std::isfinite(value)) return nullptr;
  return value;
}

}  // namespace alphatrail::cli
