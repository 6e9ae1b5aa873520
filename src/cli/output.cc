#include "cli/output.h"

#include <CLI/CLI.hpp>
#include <algorithm>
#include <cmath>
#include <map>

namespace alphatrail::cli {

CLI::Option* add_format_option(CLI::App& command, Format& format) {
  static const std::map<std::string, Format> kNames{
      {"table", Format::table}, {"json", Format::json}, {"csv", Format::csv}};
  return command.add_option("--format", format, "Output: table (default), json or csv")
      ->transform(CLI::CheckedTransformer(kNames, CLI::ignore_case))
      ->default_str("table");
}

namespace {

// Counts display columns: UTF-8 continuation bytes take no room of their own.
std::size_t display_width(const std::string& text) {
  return static_cast<std::size_t>(std::count_if(text.begin(), text.end(), [](char c) {
    return (static_cast<unsigned char>(c) & 0xC0) != 0x80;
  }));
}

}  // namespace

void print_table(std::ostream& out, const Table& table) {
  std::vector<std::size_t> widths(table.header.size(), 0);
  for (std::size_t c = 0; c < table.header.size(); ++c) widths[c] = display_width(table.header[c]);
  for (const auto& row : table.rows)
    for (std::size_t c = 0; c < row.size() && c < widths.size(); ++c)
      widths[c] = std::max(widths[c], display_width(row[c]));

  const auto print_row = [&](const std::vector<std::string>& row) {
    std::string line;
    for (std::size_t c = 0; c < widths.size(); ++c) {
      const std::string& cell = c < row.size() ? row[c] : std::string();
      const std::string pad(widths[c] - display_width(cell), ' ');
      const bool right = c < table.right_aligned.size() && table.right_aligned[c];
      if (c > 0) line += "  ";
      line += right ? pad + cell : cell + pad;
    }
    while (!line.empty() && line.back() == ' ') line.pop_back();
    out << line << '\n';
  };
  print_row(table.header);
  std::string rule;
  for (std::size_t c = 0; c < widths.size(); ++c) {
    if (c > 0) rule += "  ";
    rule += std::string(widths[c], '-');
  }
  out << rule << '\n';
  for (const auto& row : table.rows) print_row(row);
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

void print_csv(std::ostream& out, const Table& table) {
  const auto print_row = [&](const std::vector<std::string>& row) {
    for (std::size_t c = 0; c < row.size(); ++c) out << (c > 0 ? "," : "") << csv_field(row[c]);
    out << '\n';
  };
  print_row(table.header);
  for (const auto& row : table.rows) print_row(row);
}

void print_json(std::ostream& out, const nlohmann::ordered_json& value) {
  out << value.dump(2) << '\n';
}

nlohmann::ordered_json json_number(double value) {
  if (!std::isfinite(value)) return nullptr;
  return value;
}

}  // namespace alphatrail::cli
