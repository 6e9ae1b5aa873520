#include "record/run_parameters.h"

#include <fmt/format.h>

#include <cmath>
#include <cstdio>
#include <limits>
#include <nlohmann/json.hpp>
#include <tuple>

#include "record/stored_text.h"

namespace alphatrail::record {

namespace {

// The descriptive fields every run states; their text is part of the parameters the inputs
// hash covers.
constexpr const char* kLagRule = "floor(4 (T/100)^(2/9))";
constexpr const char* kAlignment = "complete cases by calendar period (exact dates for daily)";
constexpr const char* kPartialPeriods = "dropped";
constexpr const char* kReturns = "simple returns, compounded within a period";
constexpr const char* kSingleIndex = "single-index";
constexpr const char* kMultiFactor = "multi-factor";

// Reads a field that holds one of the names of a vocabulary.
template <typename Row, std::size_t N>
auto read_enum(const StoredJson& s, const nlohmann::ordered_json& root, const char* key,
               const core::Vocabulary<Row, N>& vocabulary) {
  return vocabulary.rows()[s.one_of(s.member(root, "", key), key, vocabulary.names())].value;
}

// Reads a date field: null or "YYYY-MM-DD".
std::optional<core::Day> read_date(const StoredJson& s, const nlohmann::ordered_json& root,
                                   const char* key) {
  const auto& v = s.member(root, "", key);
  if (v.is_null()) return std::nullopt;
  if (!v.is_string()) s.fail(key, fmt::format("holds {}, not null or a date YYYY-MM-DD", v.dump()));
  const std::string text = v.get<std::string>();
  const auto d = core::parse_date(text);
  if (d.status != core::DateParse::ok || d.month_only || core::format_date(d.day) != text)
    s.fail(key, fmt::format("holds {}, not a calendar date YYYY-MM-DD", v.dump()));
  return d.day;
}

// Returns true when a version "MAJOR.MINOR.PATCH" is before 0.2.0 (no rolling estimates).
bool before_rolling(std::string_view engine_version) {
  int major = 0, minor = 0, patch = 0;
  if (std::sscanf(std::string(engine_version).c_str(), "%d.%d.%d", &major, &minor, &patch) != 3)
    return false;
  return std::make_tuple(major, minor, patch) < std::make_tuple(0, 2, 0);
}

}  // namespace

std::string parameters_text(const RunParameters& p) {
  nlohmann::json factors = nlohmann::json::array();
  for (const auto& f : p.factors) factors.push_back({{"set", f.set}, {"columns", f.columns}});
  const auto date = [](const std::optional<core::Day>& d) {
    return d ? nlohmann::json(core::format_date(*d)) : nlohmann::json();
  };
  // nlohmann::json keeps keys sorted: the order here is for reading only.
  nlohmann::json j = {{"model", p.factors.empty() ? kSingleIndex : kMultiFactor},
                      {"frequency", core::frequency_name(p.frequency)},
                      {"frequency_rule", frequency_rule_name(p.frequency_rule)},
                      {"from", date(p.from)},
                      {"to", date(p.to)},
                      {"errors", core::error_kind_name(p.errors)},
                      {"lags", p.lags ? nlohmann::json(*p.lags) : nlohmann::json("auto")},
                      {"lag_rule", kLagRule},
                      {"small_sample", p.small_sample},
                      {"confidence", p.confidence},
                      {"rate_basis", core::rate_basis_name(p.rate_basis)},
                      {"rate_timing", core::rate_timing_name(p.rate_timing)},
                      {"rate_tenor", p.rate_tenor},
                      {"tenor_rule", tenor_rule_name(p.tenor_rule)},
                      {"annualize", core::annualize_name(p.annualize)},
                      {"factors", factors},
                      {"alignment", kAlignment},
                      {"partial_periods", kPartialPeriods},
                      {"returns", kReturns}};
  if (p.rolling_window_recorded)
    j["rolling_window"] = p.rolling_window ? nlohmann::json(*p.rolling_window) : nlohmann::json();
  return j.dump();
}

std::vector<std::pair<std::string, std::string>> parameter_items(const RunParameters& p) {
  std::vector<std::pair<std::string, std::string>> out;
  const auto document = nlohmann::json::parse(parameters_text(p));  // outlives items()
  for (const auto& [key, value] : document.items())
    out.emplace_back(key, value.is_string() ? value.get<std::string>() : value.dump());
  return out;
}

RunParameters read_parameters(std::int64_t run_id, std::string_view engine_version,
                              std::string_view text, nlohmann::ordered_json* document) {
  StoredJson s(run_id, "parameters", text);
  const auto& root = s.root();
  constexpr auto kIntMax = std::numeric_limits<int>::max();
  RunParameters p;

  // The descriptive fields hold the one text each engine so far has written.
  for (const auto& [key, only] :
       {std::pair{"lag_rule", kLagRule}, std::pair{"alignment", kAlignment},
        std::pair{"partial_periods", kPartialPeriods}, std::pair{"returns", kReturns}})
    s.one_of(s.member(root, "", key), key, {only});
  const bool multi_factor =
      s.one_of(s.member(root, "", "model"), "model", {kSingleIndex, kMultiFactor}) == 1;

  p.frequency = read_enum(s, root, "frequency", core::kFrequencies);
  p.frequency_rule = read_enum(s, root, "frequency_rule", kFrequencyRules);
  p.from = read_date(s, root, "from");
  p.to = read_date(s, root, "to");
  if (p.from && p.to && *p.to < *p.from)
    s.fail("to", fmt::format("holds \"{}\", before from (\"{}\")", core::format_date(*p.to),
                             core::format_date(*p.from)));
  p.errors = read_enum(s, root, "errors", core::kErrorKinds);
  const auto& lags = s.member(root, "", "lags");
  if (lags.is_string())
    s.one_of(lags, "lags", {"auto"});
  else
    p.lags = static_cast<int>(s.whole(lags, "lags", 0, kIntMax));
  p.small_sample = s.flag(s.member(root, "", "small_sample"), "small_sample");
  if (p.errors != core::ErrorKind::newey_west) {
    if (p.lags)
      s.fail("lags",
             fmt::format("holds {}, but lags apply to newey-west errors only (errors is {})",
                         *p.lags, core::error_kind_name(p.errors)));
    if (p.small_sample)
      s.fail("small_sample",
             fmt::format("holds true, but the factor applies to newey-west errors only (errors "
                         "is {})",
                         core::error_kind_name(p.errors)));
  }
  p.confidence = s.number(s.member(root, "", "confidence"), "confidence");
  if (!(p.confidence > 0 && p.confidence < 1))
    s.fail("confidence",
           fmt::format("holds {}, out of range (between 0 and 1)", root["confidence"].dump()));
  p.rate_basis = read_enum(s, root, "rate_basis", core::kRateBases);
  p.rate_timing = read_enum(s, root, "rate_timing", core::kRateTimings);
  p.rate_tenor = s.text(s.member(root, "", "rate_tenor"), "rate_tenor");
  if (p.rate_tenor.empty()) s.fail("rate_tenor", "holds \"\", not a tenor");
  p.tenor_rule = read_enum(s, root, "tenor_rule", kTenorRules);
  p.annualize = read_enum(s, root, "annualize", core::kAnnualizations);

  const auto& factors = s.array(s.member(root, "", "factors"), "factors");
  for (std::size_t i = 0; i < factors.size(); ++i) {
    const std::string path = element_of("factors", i);
    const auto& f = s.object(factors[i], path);
    FactorSet set;
    set.set = s.text(s.member(f, path, "set"), path_of(path, "set"));
    if (set.set.empty()) s.fail(path_of(path, "set"), "holds \"\", not a series name");
    const std::string columns = path_of(path, "columns");
    set.columns = s.texts(s.member(f, path, "columns"), columns);
    if (set.columns.empty()) s.fail(columns, "holds [], not the columns used");
    for (std::size_t c = 0; c < set.columns.size(); ++c)
      if (set.columns[c].empty()) s.fail(element_of(columns, c), "holds \"\", not a column name");
    p.factors.push_back(std::move(set));
  }
  if (multi_factor == p.factors.empty())
    s.fail("model", fmt::format("holds \"{}\", but the run has {} factor sets",
                                multi_factor ? kMultiFactor : kSingleIndex, p.factors.size()));

  if (const auto* rolling = s.optional_member(root, "rolling_window")) {
    if (!rolling->is_null())
      p.rolling_window = static_cast<int>(s.whole(*rolling, "rolling_window", 1, kIntMax));
  } else if (before_rolling(engine_version)) {
    p.rolling_window_recorded = false;
  } else {
    s.member(root, "", "rolling_window");  // throws: missing
  }
  if (document) *document = s.take();
  return p;
}

}  // namespace alphatrail::record
