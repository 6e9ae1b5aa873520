// The parameters of a run as a typed value: what `evaluate` was asked for, with every default
// written out, as recorded in runs.parameters_json. One writer makes the canonical text (the
// text the inputs hash covers: nlohmann-json's dump, sorted keys, no spaces) and one reader
// takes stored text back, checking every field; nothing else parses stored parameters.
//
// The reader throws StoredTextError (Failure::corruption, record/stored_text.h) naming the run
// and the field for text that is not JSON, a missing key, a wrong type, an unknown name, a
// number out of range or fields that contradict each other (lags with errors other than
// Newey-West, a model that does not match the factors, `to` before `from`).
#pragma once

#include <cstdint>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "core/annualize.h"
#include "core/dates.h"
#include "core/rates.h"
#include "core/regression.h"
#include "core/vocabulary.h"

namespace alphatrail::record {

// How the evaluation frequency was decided.
enum class FrequencyRule { lowest_among_inputs, given };
// How the rate tenor was decided.
enum class TenorRule { closest_to_period_length, given };

// The wire names, as the command line and the stored text spell them, in the order a stored
// text's error message lists them.
inline constexpr auto kFrequencyRules = core::vocabulary<core::Word<FrequencyRule>>({
    {FrequencyRule::lowest_among_inputs, "lowest among the inputs"},
    {FrequencyRule::given, "given"},
});
inline constexpr auto kTenorRules = core::vocabulary<core::Word<TenorRule>>({
    {TenorRule::given, "given"},
    {TenorRule::closest_to_period_length, "closest to the period length"},
});

// One factor set of a run and the columns used from it (never empty: all when none was named).
struct FactorSet {
  std::string set;
  std::vector<std::string> columns;
  bool operator==(const FactorSet&) const = default;
};

struct RunParameters {
  core::Frequency frequency = core::Frequency::monthly;
  FrequencyRule frequency_rule = FrequencyRule::lowest_among_inputs;
  std::optional<core::Day> from;  // first day of the sample; nullopt: the inputs' first
  std::optional<core::Day> to;    // last day; nullopt: the inputs' last
  core::ErrorKind errors = core::ErrorKind::newey_west;
  std::optional<int> lags;  // Newey-West lags; nullopt: the automatic rule
  bool small_sample = false;
  double confidence = 0.95;
  core::RateBasis rate_basis = core::RateBasis::compound;
  core::RateTiming rate_timing = core::RateTiming::start;
  std::string rate_tenor;
  TenorRule tenor_rule = TenorRule::closest_to_period_length;
  core::Annualize annualize = core::Annualize::compound;
  std::vector<FactorSet> factors;     // empty: the single-index model
  std::optional<int> rolling_window;  // periods per rolling window; nullopt: none
  // Runs recorded before engine 0.2.0 have no rolling_window key (they had no rolling
  // estimates); false writes none, so that their text reads back and writes as stored.
  bool rolling_window_recorded = true;
  bool operator==(const RunParameters&) const = default;
};

// Returns the canonical parameters text of a run, the text stored and hashed.
// Example: parameters_text(p) starts {"alignment":"complete cases by calendar period ...
std::string parameters_text(const RunParameters& p);

// Returns each parameter's key with its value as text (a string as itself, any other value as
// JSON), in stored order, for showing: e.g. {"annualize", "compound"}, {"confidence", "0.95"}.
std::vector<std::pair<std::string, std::string>> parameter_items(const RunParameters& p);

// Reads the stored parameters text of run `run_id`, recorded by engine `engine_version`, and
// with `document` also hands back the text as read (its keys in stored order, for showing).
// Throws StoredTextError naming the run and the field when the text is not what the writer
// writes.
RunParameters read_parameters(std::int64_t run_id, std::string_view engine_version,
                              std::string_view text, nlohmann::ordered_json* document = nullptr);

// Returns the wire name of a rule.
inline const char* frequency_rule_name(FrequencyRule r) {
  return kFrequencyRules.name(r);
}
inline const char* tenor_rule_name(TenorRule r) {
  return kTenorRules.name(r);
}

}  // namespace alphatrail::record
