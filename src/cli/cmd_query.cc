// `alphatrail query SQL`: runs one SQL statement that only reads and streams its rows as they
// come (table, json or csv, rendered by cli/render.h), so a long or endless result needs no more
// memory than a short one.
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
#include "cli/render.h"
#include "core/error.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

struct QueryOptions {
  std::string sql;
  Format format = Format::table;
  std::int64_t limit = -1;  // the most rows to print; -1 for all
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

// Prints the rows the store hands over, in the chosen format, flushing as it goes.
class PrintingSink : public store::QueryRowSink {
 public:
  PrintingSink(Format format, std::ostream& out) : format_(format), out_(out), flusher_(out) {}
  void columns(const std::vector<std::string>& names) override {
    printer_ = row_renderer(format_, out_, names);
  }
  void row(const std::vector<store::QueryValue>& values) override {
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
  std::unique_ptr<RowRenderer> printer_;
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
