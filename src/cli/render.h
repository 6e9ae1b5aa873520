// Rendering a command's result in the format chosen with --format: the one place that says
// what table, json and csv look like. A command builds a View (or, for rows too many to hold,
// a RowRenderer) and leaves the format to this file. Writes to the stream it is given; a
// stream that fails is the caller's to notice.
#pragma once

#include <memory>
#include <nlohmann/json.hpp>
#include <ostream>
#include <string>
#include <vector>

#include "cli/output.h"
#include "store/ledger.h"

namespace alphatrail::cli {

// A result as each format shows it: the rows of its table (CSV prints the same rows), the JSON
// document with the same content, and the text only the table format adds. (clang-tidy takes
// the implicit move of the JSON member for one that may throw; nlohmann's does not.)
struct View {  // NOLINT(bugprone-exception-escape)
  Table table;
  nlohmann::ordered_json json;
  std::string footnote;    // table only: printed after a blank line under the table
  std::string when_empty;  // table only: printed instead of a table that has no rows
};

// Prints a view: json as print_json, csv as print_csv, table as print_table and its footnote.
void render(std::ostream& out, const View& view, Format format);

// A result rendered row by row as it comes, for results too long to hold: a table as
// StreamedTable prints it, CSV a line per row, JSON an array of one object per row (named by
// column) exactly as print_json would print it.
class RowRenderer {
 public:
  virtual ~RowRenderer() = default;
  virtual void row(const std::vector<store::QueryValue>& values) = 0;
  // Ends the output after the last row.
  virtual void finish() = 0;
};

// Returns the renderer of rows with these column names in the chosen format.
std::unique_ptr<RowRenderer> row_renderer(Format format, std::ostream& out,
                                          const std::vector<std::string>& names);

}  // namespace alphatrail::cli
