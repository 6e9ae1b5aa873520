// Series and their versions in the ledger: storing new versions (or recognising unchanged
// content), listing series, a series' version history and loading a version's observations.
//
// Versions are immutable: a store never updates a row; new content gets the next version.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "core/series_file.h"
#include "record/content.h"
#include "store/ledger.h"

namespace alphatrail::store {

// A version to store, as prepared from an ingest file.
struct NewVersion {
  std::string name;
  record::ContentMeta meta;
  std::string input_unit;  // decimal | percent | levels: how the file stated the values
  std::vector<record::ColumnData> columns;
};

// Where a batch of versions came from.
struct SourceInfo {
  std::string file;    // as the user named it
  std::string sha256;  // of the file's bytes
  std::string note;    // --note, may be empty
};

struct StoreOutcome {
  std::string name;
  std::string kind;
  int version = 0;
  bool new_series = false;
  bool unchanged = false;  // identical content to the latest version: nothing written
  std::string content_hash;
};

// Stores each version whose content differs from its series' latest version, every column
// as its canonical JSON and a packed copy. Must run inside Ledger::write_transaction. Throws
// Error(bad_input) when a name exists as another kind.
std::vector<StoreOutcome> store_versions(Ledger& ledger, std::vector<NewVersion> versions,
                                         const SourceInfo& source);

// One version's description (without observations).
struct VersionInfo {
  std::string name;
  std::string kind;
  int version = 0;
  std::int64_t version_id = 0;
  std::string content_hash;
  std::string unit;
  std::string input_unit;
  std::optional<std::string> quote;
  std::optional<std::string> frequency;
  std::string first_date;
  std::string last_date;
  std::int64_t observations = 0;
  std::int64_t missing = 0;
  std::string source_file;
  std::string source_sha256;
  std::string ingested_at;
  std::string ingested_by;
  std::string note;
  std::vector<std::string> columns;
};

// Returns the names of every series of a kind, in name order.
std::vector<std::string> series_names(Ledger& ledger, core::SeriesKind kind);

// Returns the latest version of every series, set and curve, ordered by kind then name.
std::vector<VersionInfo> list_latest_versions(Ledger& ledger);

// Returns every version of a series, oldest first; throws Error(not_found) when unknown.
std::vector<VersionInfo> version_history(Ledger& ledger, const std::string& name);

// A version with its observations.
struct LoadedVersion {
  VersionInfo info;
  std::vector<record::ColumnData> columns;
};

// Loads a version (the latest when version is empty); throws Error(not_found) when absent.
LoadedVersion load_version(Ledger& ledger, const std::string& name,
                           std::optional<int> version = std::nullopt);

struct VersionRequest {
  std::string name;
  std::optional<int> version;  // nullopt: the latest
};
// Loads many versions at once: each column from its packed copy, or, when it has none
// (stored before schema version 5), from its JSON decoded on all cores. The same result as
// load_version on each, in request order; throws Error(ledger) for a corrupted column.
std::vector<LoadedVersion> load_versions(Ledger& ledger,
                                         const std::vector<VersionRequest>& requests);

// Returns what load_versions would, without the observations: one version row per request.
std::vector<VersionInfo> find_versions(Ledger& ledger, const std::vector<VersionRequest>& requests);

// Loads the observations of versions find_versions returned; load_versions is the two in one.
std::vector<LoadedVersion> load_observations(Ledger& ledger, std::vector<VersionInfo> versions);

// Returns the current UTC time as ISO 8601 with milliseconds, e.g. 2026-12-02T01:02:03.004Z.
std::string utc_now();

// Returns the name of the user running the command ($USER, else the account), with bytes that
// are not storable text (core/text.h) escaped as \xNN.
std::string current_user();

}  // namespace alphatrail::store
