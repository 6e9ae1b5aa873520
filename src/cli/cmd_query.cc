// `alphatrail query SQL`: runs one SQL statement that only reads and streams its rows as they
// come (table, json or csv), so a long or endless result needs no more memory than a short one.
//
// What may run is the store's to decide (Ledger::read_only_query: in SQLite an authorizer on a
// read-only connection); this file only parses the options and prints. A refused statement
// exits 2, names what was refused and leaves the ledger as it was. A failure after the first
// rows were printed exits 2 too, the rows printed so far standing.
#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <chrono>
#include <cstdint>
#include <iostream>
#include <memory>
#include <string>
#include <vector>

#include "cli/commands.h"
#include "cli/output.h"
#include "core/error.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

struct QueryOptions {
  std::string sql;
  Format format = Format::table;
  std::int64_t limit = -1;  // the most rows to print; -1 for all
};

// --- printing rows as they come ------------------------------------------------------------

using store::QueryValue;

// Returns a cell as text: an integer in full, a double in its shortest exact form, text and
// blobs as stored, NULL as `null_text`.
std::string cell_text(const QueryValue& value, const char* null_text) {
  switch (value.type) {
    case QueryValue::Type::null: return null_text;
    case QueryValue::Type::integer: return std::to_string(value.integer);
    case QueryValue::Type::real: return fmt::format("{}", value.real);
    case QueryValue::Type::text:
    case QueryValue::Type::blob: break;
  }
  return value.bytes;
}

class RowPrinter {
 public:
  virtual ~RowPrinter() = default;
  virtual void row(const std::vector<QueryValue>& values) = 0;
  // Ends the output after the last row.
  virtual void finish() = 0;
};

class CsvRows : public RowPrinter {
 public:
  CsvRows(std::ostream& out, const std::vector<std::string>& names) : out_(out) {
    print_csv_row(out_, names);
  }
  void row(const std::vector<QueryValue>& values) override {
    cells_.clear();
    for (const QueryValue& value : values) cells_.push_back(cell_text(value, ""));
    print_csv_row(out_, cells_);
  }
  void finish() override {}

 private:
  std::ostream& out_;
  std::vector<std::string> cells_;
};

// A JSON array of one object per row, as print_json prints it, written row by row.
class JsonRows : public RowPrinter {
 public:
  JsonRows(std::ostream& out, const std::vector<std::string>& names) : out_(out), names_(names) {
    out_ << '[';
  }
  void row(const std::vector<QueryValue>& values) override {
    nlohmann::ordered_json object = nlohmann::ordered_json::object();
    for (std::size_t c = 0; c < values.size(); ++c) {
      auto& value = object[names_[c]];
      switch (values[c].type) {
        case QueryValue::Type::null: value = nullptr; break;
        case QueryValue::Type::integer: value = values[c].integer; break;
        case QueryValue::Type::real: value = json_number(values[c].real); break;
        case QueryValue::Type::text:
        case QueryValue::Type::blob: value = values[c].bytes;
      }
    }
    // Indented one level deeper, as inside the array (JSON text holds no raw line breaks).
    std::string text = rows_ == 0 ? "\n  " : ",\n  ";
    // Text that is not UTF-8 (a blob cast to text) prints as U+FFFD rather than failing.
    for (const char c : object.dump(2, ' ', false, nlohmann::json::error_handler_t::replace)) {
      text += c;
      if (c == '\n') text += "  ";
    }
    out_.write(text.data(), static_cast<std::streamsize>(text.size()));
    ++rows_;
  }
  void finish() override { out_ << (rows_ == 0 ? "]\n" : "\n]\n"); }

 private:
  std::ostream& out_;
  std::vector<std::string> names_;
  std::int64_t rows_ = 0;
};

class TableRows : public RowPrinter {
 public:
  TableRows(std::ostream& out, const std::vector<std::string>& names) : table_(out, names) {}
  void row(const std::vector<QueryValue>& values) override {
    std::vector<std::string> cells;
    cells.reserve(values.size());
    numbers_.assign(values.size(), false);
    for (std::size_t c = 0; c < values.size(); ++c) {
      numbers_[c] =
          values[c].type == QueryValue::Type::integer || values[c].type == QueryValue::Type::real;
      cells.push_back(cell_text(values[c], "NULL"));
    }
    table_.add(std::move(cells), numbers_);
  }
  void finish() override { table_.finish(); }

 private:
  StreamedTable table_;
  std::vector<bool> numbers_;
};

// Pushes printed rows out while the query runs: what was printed is flushed once 50 ms have
// passed since the last flush, checked after each row and, through the sink's waiting(),
// while the store works towards the next. The first rows appear at once even when the rest
// takes long, and a fast result is still written in large blocks rather than a write per row.
class Flusher {
 public:
  explicit Flusher(std::ostream& out) : out_(out), last_(Clock::now()) {}
  void printed() {
    pending_ = true;
    flush_when_due();
  }
  void flush_when_due() {
    if (pending_ && Clock::now() - last_ >= kInterval) flush();
  }
  void flush() {
    out_.flush();
    pending_ = false;
    last_ = Clock::now();
  }

 private:
  using Clock = std::chrono::steady_clock;
  static constexpr std::chrono::milliseconds kInterval{50};
  std::ostream& out_;
  Clock::time_point last_;
  bool pending_ = false;
};

std::unique_ptr<RowPrinter> row_printer(Format format, std::ostream& out,
                                        const std::vector<std::string>& names) {
  switch (format) {
    case Format::json: return std::make_unique<JsonRows>(out, names);
    case Format::csv: return std::make_unique<CsvRows>(out, names);
    case Format::table: break;
  }
  return std::make_unique<TableRows>(out, names);
}

// Prints the rows the store hands over, in the chosen format, flushing as it goes.
class PrintingSink : public store::QueryRowSink {
 public:
  PrintingSink(Format format, std::ostream& out) : format_(format), out_(out), flusher_(out) {}
  void columns(const std::vector<std::string>& names) override {
    printer_ = row_printer(format_, out_, names);
  }
  void row(const std::vector<QueryValue>& values) override {
    printer_->row(values);
    flusher_.printed();
    if (!out_)  // a closed pipe or a full disk: an endless query would never stop
      throw Error(Failure::internal, "query stopped: its output could not be written");
  }
  void waiting() override { flusher_.flush_when_due(); }
  void finish() {
    printer_->finish();
    flusher_.flush();
  }
  void flush() { flusher_.flush(); }

 private:
  Format format_;
  std::ostream& out_;
  Flusher flusher_;
  std::unique_ptr<RowPrinter> printer_;
};

void run_query(const QueryOptions& o, const GlobalOptions& global) {
  const auto ledger = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                         store::OpenMode::read_only, std::cerr);
  PrintingSink sink(o.format, std::cout);
  try {
    ledger->read_only_query(o.sql, o.limit, sink);
  } catch (const Error&) {
    sink.flush();  // the rows printed so far stand
    throw;
  }
  sink.finish();
}

}  // namespace

void setup_query(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<QueryOptions>();
  auto* cmd = app.add_subcommand(
      "query", "Run one SQL statement that only reads, printing its rows as they come");
  cmd->add_option("sql", o->sql,
                  "One SQL statement that reads: SELECT, WITH ... SELECT, or a PRAGMA that "
                  "reports (a trailing ; and comments are fine)")
      ->required();
  add_format_option(*cmd, o->format);
  cmd->add_option("--limit", o->limit,
                  "Print at most N rows (N >= 0) and stop the query there; default: all rows")
      ->type_name("N")
      ->check(CLI::Validator(
          [](const std::string& text) {
            const bool digits =
                !text.empty() && text.find_first_not_of("0123456789") == std::string::npos;
            return digits ? std::string()
                          : fmt::format("needs a whole number of rows, 0 or more, not '{}'", text);
          },
          "N >= 0"));
  cmd->callback([o, &global] { run_query(*o, global); });
}

}  // namespace alphatrail::cli
