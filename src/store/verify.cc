#include "store/verify.h"

#include <fmt/format.h>

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>
#include <optional>
#include <string_view>

#include "core/dates.h"
#include "core/error.h"
#include "record/content.h"
#include "record/run_parameters.h"
#include "record/stored_result.h"
#include "record/stored_text.h"
#include "store/ledger.h"

namespace alphatrail::store {

namespace {

// Reads the little-endian word of type Word at byte `at` of bytes.
template <typename Word>
Word word_at(std::string_view bytes, std::size_t at) {
  Word w = 0;
  for (std::size_t b = 0; b < sizeof(Word); ++b)
    w |= static_cast<Word>(static_cast<unsigned char>(bytes[at + b])) << (8 * b);
  return w;
}

// Shows a day read from a packed copy, which may lie outside the years a date can be written.
std::string shown_day(core::Day day) {
  if (day < record::kFirstStoredDay || day > record::kLastStoredDay)
    return fmt::format("day number {}", day);
  return core::format_date(day);
}

// Shows a value as the JSON writes it, or a NaN other than the one that stands for null.
std::string shown_value(double x) {
  if (!std::isnan(x)) return fmt::format("{}", x);
  const auto bits = std::bit_cast<std::uint64_t>(x);
  return bits == std::bit_cast<std::uint64_t>(std::numeric_limits<double>::quiet_NaN())
             ? std::string("null")
             : fmt::format("NaN {:#018x}", bits);
}

// Returns what differs between a column's packed copy and its decoded JSON, nullopt when they
// are equal byte for byte (dates, every bit of every value, the one NaN where JSON has null).
std::optional<std::string> packed_mismatch(const record::ColumnData& column, std::string_view days,
                                           std::string_view numbers) {
  const record::PackedColumn expected = record::encode_packed(column);
  if (days == expected.days && numbers == expected.numbers) return std::nullopt;
  const std::size_t n = column.dates.size();
  if (days.size() != expected.days.size() || numbers.size() != expected.numbers.size())
    return fmt::format(
        "holds {} bytes of days and {} bytes of numbers, not the {} and {} of its "
        "{} observations",
        days.size(), numbers.size(), expected.days.size(), expected.numbers.size(), n);
  for (std::size_t i = 0; i < n; ++i) {
    const auto day = static_cast<core::Day>(word_at<std::uint32_t>(days, 4 * i));
    if (day != column.dates[i])
      return fmt::format("observation {} is dated {} in values_json but {} in the packed copy",
                         i + 1, core::format_date(column.dates[i]), shown_day(day));
    const auto bits = word_at<std::uint64_t>(numbers, 8 * i);
    if (bits != word_at<std::uint64_t>(expected.numbers, 8 * i))
      return fmt::format("the value of {} is {} in values_json but {} in the packed copy",
                         core::format_date(column.dates[i]), shown_value(column.values[i]),
                         shown_value(std::bit_cast<double>(bits)));
  }
  return std::nullopt;  // not reached: equal sizes and equal words are equal bytes
}

void verify_versions(Ledger& ledger, VerifyReport& report) {
  ledger.for_each_stored_version([&](const StoredVersion& version) {
    ++report.versions_checked;
    const std::string object = fmt::format("series {} version {}", version.name, version.version);
    std::vector<record::EncodedColumn> encoded;
    std::vector<core::Day> dates;
    std::int64_t missing = 0;
    for (const StoredColumn& stored : version.columns) {
      encoded.push_back({stored.name, stored.values_json});
      try {
        const auto column =
            record::decode_values_json(encoded.back().name, encoded.back().values_json);
        dates.insert(dates.end(), column.dates.begin(), column.dates.end());
        missing += std::count_if(column.values.begin(), column.values.end(),
                                 [](double v) { return std::isnan(v); });
        // The packed copy is what loading reads: it must say exactly what the hashed JSON says.
        if (stored.packed_days) {
          if (const auto problem =
                  packed_mismatch(column, *stored.packed_days, stored.packed_numbers))
            report.problems.push_back(
                {object, fmt::format("the packed copy of column '{}' does not match its "
                                     "values_json: {}",
                                     column.name, *problem)});
        }
      } catch (const Error& e) {
        report.problems.push_back(
            {object, fmt::format("column '{}' is malformed", encoded.back().name)});
      }
    }
    if (encoded.empty()) report.problems.push_back({object, "has no stored observations"});
    // The version's description must be what its observations say.
    std::sort(dates.begin(), dates.end());
    dates.erase(std::unique(dates.begin(), dates.end()), dates.end());
    if (!dates.empty()) {
      const auto frequency = core::detect_frequency(dates);
      const std::string described =
          fmt::format("{} {} {} {} {}", version.frequency, version.first_date, version.last_date,
                      version.observations, version.missing);
      const std::string observed = fmt::format(
          "{} {} {} {} {}", frequency ? core::frequency_name(*frequency) : "",
          core::format_date(dates.front()), core::format_date(dates.back()), dates.size(), missing);
      if (described != observed)
        report.problems.push_back(
            {object, fmt::format("its description (frequency, first, last, observations, "
                                 "missing: {}) does not match its observations ({})",
                                 described, observed)});
    }
    const std::string& stored = version.content_hash;
    const std::string computed = record::content_hash(version.meta, encoded);
    if (stored != computed)
      report.problems.push_back(
          {object, fmt::format("content hash {} does not match its observations ({})",
                               stored.substr(0, 12), computed.substr(0, 12))});
  });
}

void verify_runs(Ledger& ledger, VerifyReport& report) {
  std::string previous = record::kGenesisHash;
  std::int64_t expected_id = 1;
  for (const std::int64_t id : ledger.run_ids()) {
    ++report.runs_checked;
    const std::string object = fmt::format("run {}", id);
    if (id != expected_id)
      report.problems.push_back(
          {object,
           fmt::format("runs are not numbered without gaps: expected run {} here", expected_id)});
    expected_id = id + 1;
    const auto row = ledger.read_run_row(id);
    const std::string inputs =
        record::inputs_hash(row->engine_version, row->parameters_json, ledger.read_run_inputs(id));
    if (inputs != row->inputs_hash)
      report.problems.push_back(
          {object, fmt::format("inputs hash {} does not match its inputs and parameters ({})",
                               row->inputs_hash.substr(0, 12), inputs.substr(0, 12))});
    if (row->previous_record_hash != previous)
      report.problems.push_back(
          {object,
           "the hash chain is broken before this run: a run was removed, reordered or "
           "edited"});
    const std::string record =
        record::chain_hash(row->previous_record_hash, record::canonical_run_record(*row));
    if (record != row->record_hash)
      report.problems.push_back(
          {object, "its record does not match its record hash: the run was edited"});
    // The stored texts must read as what the engine writes, field by field.
    try {
      record::read_parameters(id, row->engine_version, row->parameters_json);
      record::read_result(id, row->result_json);
    } catch (const record::StoredTextError& e) {
      report.problems.push_back({object, e.problem()});
    }
    previous = row->record_hash;
  }
  report.chain_head = previous;
}

}  // namespace

VerifyReport verify_ledger(Ledger& ledger) {
  VerifyReport report;
  report.chain_head = record::kGenesisHash;
  for (const std::string& line : ledger.integrity_problems())
    report.problems.push_back({"ledger file", "integrity check: " + line});
  verify_versions(ledger, report);
  verify_runs(ledger, report);
  return report;
}

}  // namespace alphatrail::store
