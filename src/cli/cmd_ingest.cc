#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <fstream>
#include <iostream>
#include <sstream>

#include "cli/choices.h"
#include "cli/commands.h"
#include "cli/ingest.h"
#include "cli/option_text.h"
#include "core/error.h"
#include "core/series_file.h"
#include "core/sha256.h"
#include "core/text.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

std::string read_input_file(const std::string& path) {
  std::error_code ec;
  if (!std::filesystem::exists(path, ec))
    throw InputError(path, 0, 0, "no such file", "check the path");
  if (std::filesystem::is_directory(path, ec))
    throw InputError(path, 0, 0, "is a folder, not a file", "name a CSV file");
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, 0, 0, "cannot be read", "check its permissions");
  std::string bytes;
  if (std::filesystem::is_regular_file(path, ec))
    bytes.reserve(std::filesystem::file_size(path, ec));
  // Read in blocks: pipes and devices have no size, but their bytes are the file.
  char block[1 << 16];
  while (in.read(block, sizeof block) || in.gcount() > 0)
    bytes.append(block, static_cast<std::size_t>(in.gcount()));
  if (in.bad()) throw InputError(path, 0, 0, "cannot be read", "check the file");
  return bytes;
}

core::SeriesFileOptions parse_options(const IngestRequest& o, core::SeriesKind kind) {
  core::SeriesFileOptions parse;
  parse.kind = kind;
  parse.date_column = o.date_column;
  parse.columns = o.columns;
  const bool is_rate = kind == core::SeriesKind::rate;
  if (is_rate && (o.percent || o.levels))
    throw Error(Failure::invalid_argument,
                "rate files hold annualized yields, in percent by default: use --decimal for "
                "decimals (--percent and --levels are for returns)");
  if (!is_rate && o.decimal)
    throw Error(Failure::invalid_argument,
                "returns are read as decimals by default; --decimal is for rate files");
  if (o.percent && o.levels)
    throw Error(Failure::invalid_argument,
                "--percent and --levels exclude each other: levels have no unit");
  parse.quote = *core::parse_rate_quote(o.quote);
  if (!is_rate && parse.quote != core::RateQuote::yield)
    throw Error(Failure::invalid_argument, "--quote applies to rate files only");
  if (is_rate && o.allow_large_returns)
    throw Error(Failure::invalid_argument,
                "--allow-large-returns is for returns; rate files hold yields, checked against "
                "their plausible range");
  parse.allow_large_returns = o.allow_large_returns;
  // The flags were checked against the kind above: each names a unit the kind can be read in.
  parse.unit = o.levels    ? core::ValueUnit::levels
               : o.percent ? core::ValueUnit::percent
               : o.decimal ? core::ValueUnit::decimal
                           : core::default_unit(kind);
  if (is_rate) {
    parse.rename = o.tenor;
  } else if (kind == core::SeriesKind::strategy || kind == core::SeriesKind::benchmark) {
    parse.rename = o.name;
  }
  if (!o.tenor.empty() && !is_rate)
    throw Error(Failure::invalid_argument, "--tenor applies to rate files only");
  return parse;
}

// Checks the text of the request that the ledger stores: the names, the note and the file's
// path (recorded as the source of the versions).
void check_stored_text(const IngestRequest& o) {
  if (!o.name.empty()) require_storable_name("--name", o.name);
  if (!o.tenor.empty()) require_storable_name("--tenor", o.tenor);
  require_storable_text("--note", o.note);
  if (const auto problem = core::text_problem(o.file)) {
    const bool utf8 = problem->fault == core::TextFault::not_utf8;
    throw Error(Failure::invalid_argument,
                fmt::format("file '{}': byte {} of the path is {} ({}) (the ledger records the "
                            "path: rename the file, or link to it under a name {})",
                            core::printable_text(o.file), problem->byte,
                            utf8 ? "not valid UTF-8" : "a control character", problem->detail,
                            utf8 ? "in UTF-8" : "without control characters"));
  }
}

}  // namespace

CheckedFile check_file(const IngestRequest& o, std::ostream& notes) {
  const auto kind = *core::parse_series_kind(o.kind);
  const bool is_set = kind == core::SeriesKind::rate || kind == core::SeriesKind::factor;
  if (is_set && o.name.empty())
    throw Error(Failure::invalid_argument,
                fmt::format("a {} file is one named {}: give it a name with --name", o.kind,
                            kind == core::SeriesKind::rate ? "rate curve" : "factor set"));
  check_stored_text(o);
  const core::SeriesFileOptions parse = parse_options(o, kind);

  const std::string bytes = read_input_file(o.file);
  core::SeriesFile parsed = core::parse_series_file(o.file, bytes, parse);
  for (const auto& note : parsed.notes) notes << "alphatrail: note: " << note << '\n';

  record::ContentMeta meta{core::series_kind_name(kind),
                           record::stored_unit_name(record::stored_unit_for(kind, parse.unit)),
                           std::nullopt};
  if (kind == core::SeriesKind::rate) meta.quote = core::rate_quote_name(parse.quote);

  CheckedFile checked{o.file, {}, {o.file, core::sha256_hex(bytes), o.note}};
  if (is_set) {
    checked.versions.push_back(
        {o.name, meta, core::value_unit_name(parse.unit), std::move(parsed.columns)});
  } else {
    checked.versions.reserve(parsed.columns.size());
    for (auto& column : parsed.columns) {
      std::string name = column.name;
      std::vector<record::ColumnData> one;
      one.push_back(std::move(column));
      checked.versions.push_back({name, meta, core::value_unit_name(parse.unit), std::move(one)});
    }
  }
  return checked;
}

void store_file(store::Ledger& ledger, CheckedFile checked, std::ostream& out) {
  std::vector<store::StoreOutcome> outcomes;
  ledger.write_transaction(
      [&] { outcomes = ledger.store_versions(std::move(checked.versions), checked.source); });

  int added = 0;
  int unchanged = 0;
  const bool list_each = outcomes.size() <= 20;
  for (const auto& r : outcomes) {
    (r.unchanged ? unchanged : added) += 1;
    if (!list_each) continue;
    if (r.unchanged)
      out << fmt::format("{} {}: unchanged (version {}, {})\n", r.kind, r.name, r.version,
                         r.content_hash.substr(0, 12));
    else
      out << fmt::format("{} {}: version {}{} ({})\n", r.kind, r.name, r.version,
                         r.new_series ? ", new series" : "", r.content_hash.substr(0, 12));
  }
  out << fmt::format("{}: {} new version{}, {} unchanged\n", checked.file, added,
                     added == 1 ? "" : "s", unchanged);
}

void ingest_file(const std::filesystem::path& ledger_path, const IngestRequest& o,
                 std::ostream& out, std::ostream& notes) {
  CheckedFile checked = check_file(o, notes);  // before the ledger is opened (or created)
  auto ledger_opened = store::open_ledger(ledger_path, store::OpenMode::create, notes);
  store::Ledger& ledger = *ledger_opened;
  store_file(ledger, std::move(checked), out);
}

void setup_ingest(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<IngestRequest>();
  auto* cmd = app.add_subcommand(
      "ingest",
      "Add series from a CSV file: each strategy or benchmark column becomes a series; a factor "
      "file is one factor set, a rate file one rate curve. New content gets a new version.");
  cmd->add_option("kind", o->kind, listed_names(core::kSeriesKinds))
      ->required()
      ->check(CLI::IsMember(core::kSeriesKinds.names()));
  cmd->add_option("file", o->file, "CSV file (RFC 4180, header row, ISO 8601 dates)")->required();
  cmd->add_option("--name", o->name,
                  "Name of a single-column strategy or benchmark, or of the factor set or rate "
                  "curve (required for those)");
  cmd->add_option("--tenor", o->tenor, "Tenor of a single-column rate file, e.g. 1M or 13W");
  cmd->add_option("--date-column", o->date_column, "Date column (default: the first column)");
  cmd->add_option("--columns", o->columns, "Value columns to read (default: all)")->delimiter(',');
  cmd->add_flag("--percent", o->percent, "Returns are in percent (default: decimals)");
  cmd->add_flag("--levels", o->levels, "Values are prices, NAV or index levels, not returns");
  cmd->add_flag("--decimal", o->decimal, "Rate yields are decimals (default: percent)");
  cmd->add_flag("--allow-large-returns", o->allow_large_returns,
                "Accept returns above +1,000% in one period (refused by default as most likely "
                "a wrong value or unit)");
  cmd->add_option("--quote", o->quote, "Rate quote: yield (default) or discount (bank discount)")
      ->check(CLI::IsMember(core::kRateQuotes.names()));
  cmd->add_option("--note", o->note, "Note stored with the new versions");
  cmd->callback([o, &global] {
    ingest_file(store::resolve_ledger_path(global.ledger), *o, std::cout, std::cerr);
  });
}

}  // namespace alphatrail::cli
