#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <algorithm>
#include <cmath>
#include <iostream>

#include "cli/commands.h"
#include "cli/output.h"
#include "core/error.h"
#include "core/series_diff.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

struct SeriesOptions {
  std::string name;       // empty: list every series
  std::vector<int> diff;  // --diff V1 V2
  Format format = Format::table;
};

void print_diff(store::Ledger& ledger, const SeriesOptions& o) {
  const auto older = ledger.load_version(o.name, o.diff[0]);
  const auto newer = ledger.load_version(o.name, o.diff[1]);
  auto json = nlohmann::ordered_json::array();
  Table table;
  table.header = {"column", "date", "change", "before", "after", "difference"};
  table.right_aligned = {false, false, false, true, true, true};
  const auto value = [](double v) {
    return std::isnan(v) ? std::string("missing") : fmt::format("{}", v);
  };
  std::vector<std::string> counts;
  for (const core::ColumnDiff& d : core::diff_columns(older.columns, newer.columns)) {
    counts.push_back(fmt::format("{}: {} changed, {} added, {} removed", d.column, d.changed.size(),
                                 d.added.size(), d.removed.size()));
    auto changed = nlohmann::ordered_json::array();
    for (const auto& c : d.changed) {
      table.rows.push_back(
          {d.column, core::format_date(c.date), "changed", value(c.before), value(c.after),
           std::isnan(c.before) || std::isnan(c.after) ? ""
                                                       : fmt::format("{:+}", c.after - c.before)});
      changed.push_back({{"date", core::format_date(c.date)},
                         {"before", json_number(c.before)},
                         {"after", json_number(c.after)}});
    }
    std::vector<std::string> added;
    std::vector<std::string> removed;
    for (auto day : d.added) {
      added.push_back(core::format_date(day));
      table.rows.push_back({d.column, added.back(), "added", "", "", ""});
    }
    for (auto day : d.removed) {
      removed.push_back(core::format_date(day));
      table.rows.push_back({d.column, removed.back(), "removed", "", "", ""});
    }
    json.push_back(
        {{"column", d.column}, {"changed", changed}, {"added", added}, {"removed", removed}});
  }
  if (o.format == Format::json) {
    print_json(std::cout, {{"name", o.name},
                           {"from_version", o.diff[0]},
                           {"to_version", o.diff[1]},
                           {"columns", json}});
    return;
  }
  if (o.format == Format::csv) {
    print_csv(std::cout, table);
    return;
  }
  std::cout << fmt::format("{}: version {} -> {} ({} -> {})\n", o.name, o.diff[0], o.diff[1],
                           older.info.content_hash.substr(0, 12),
                           newer.info.content_hash.substr(0, 12));
  for (const auto& c : counts) std::cout << "  " << c << '\n';
  std::cout << '\n';
  print_table(std::cout, table);
  std::cout << "\nlargest changes first; values as stored (" << newer.info.unit << ")\n";
}

nlohmann::ordered_json optional_json(const std::optional<std::string>& text) {
  if (text) return *text;
  return nullptr;
}

nlohmann::ordered_json version_json(const store::VersionInfo& v) {
  return {{"name", v.name},
          {"kind", v.kind},
          {"frequency", optional_json(v.frequency)},
          {"first", v.first_date},
          {"last", v.last_date},
          {"observations", v.observations},
          {"missing", v.missing},
          {"version", v.version},
          {"content_hash", v.content_hash},
          {"unit", v.unit},
          {"input_unit", v.input_unit},
          {"quote", optional_json(v.quote)},
          {"columns", v.columns},
          {"source_file", v.source_file},
          {"source_sha256", v.source_sha256},
          {"ingested_at", v.ingested_at},
          {"ingested_by", v.ingested_by},
          {"note", v.note}};
}

void print_versions(const std::vector<store::VersionInfo>& versions, Format format, bool history) {
  if (format == Format::json) {
    auto array = nlohmann::ordered_json::array();
    for (const auto& v : versions) array.push_back(version_json(v));
    print_json(std::cout, array);
    return;
  }
  Table table;
  if (history) {
    table.header = {"version", "ingested (UTC)", "by",          "observations", "first",
                    "last",    "content hash",   "source file", "note"};
    table.right_aligned = {true, false, false, true};
  } else {
    table.header = {"name",         "kind",    "frequency", "first",       "last",
                    "observations", "columns", "version",   "content hash"};
    table.right_aligned = {false, false, false, false, false, true, true, true};
  }
  for (const auto& v : versions) {
    const std::string hash = format == Format::csv ? v.content_hash : v.content_hash.substr(0, 12);
    if (history)
      table.rows.push_back({std::to_string(v.version), v.ingested_at, v.ingested_by,
                            std::to_string(v.observations), v.first_date, v.last_date, hash,
                            v.source_file, v.note});
    else
      table.rows.push_back({v.name, v.kind, v.frequency.value_or("irregular"), v.first_date,
                            v.last_date, std::to_string(v.observations),
                            std::to_string(v.columns.size()), std::to_string(v.version), hash});
  }
  if (format == Format::csv) {
    print_csv(std::cout, table);
    return;
  }
  if (versions.empty()) {
    std::cout << "the ledger holds no series yet; add some with `alphatrail ingest`\n";
    return;
  }
  if (history) {
    const auto& latest = versions.back();
    std::cout << fmt::format("{} ({} series, {}; columns: {})\n\n", latest.name, latest.kind,
                             latest.unit, fmt::join(latest.columns, ", "));
  }
  print_table(std::cout, table);
}

void run_series(const SeriesOptions& options, const GlobalOptions& global) {
  auto ledger_opened = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                          store::OpenMode::read_only, std::cerr);
  store::Ledger& ledger = *ledger_opened;
  if (!options.diff.empty()) {
    if (options.name.empty())
      throw Error(Failure::invalid_argument,
                  "--diff needs a series name: series NAME --diff V1 V2");
    print_diff(ledger, options);
  } else if (options.name.empty())
    print_versions(ledger.list_latest_versions(), options.format, false);
  else
    print_versions(ledger.version_history(options.name), options.format, true);
}

}  // namespace

void setup_series(CLI::App& app, const GlobalOptions& global) {
  auto options = std::make_shared<SeriesOptions>();
  auto* cmd = app.add_subcommand(
      "series", "List every series, factor set and rate curve, or one series' version history");
  cmd->add_option("name", options->name, "Series to show the version history of");
  cmd->add_option("--diff", options->diff,
                  "Show the periods added, removed and changed between two versions")
      ->expected(2);
  add_format_option(*cmd, options->format);
  cmd->callback([options, &global] { run_series(*options, global); });
}

}  // namespace alphatrail::cli
