#include "core/align.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/error.h"

namespace alphatrail::core {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

[[noreturn]] void bad_input(const std::string& message) {
  throw Error(Failure::bad_input, message);
}

void validate(const NamedSeries& input, Frequency f) {
  const PeriodSeries& s = input.series;
  if (s.frequency != f)
    bad_input(fmt::format("series \"{}\" is {} but the evaluation is {}; resample it first",
                          input.name, frequency_name(s.frequency), frequency_name(f)));
  if (s.keys.size() != s.values.size())
    bad_input(
        fmt::format("series \"{}\" has {} periods but {} values; give one value per "
                    "period",
                    input.name, s.keys.size(), s.values.size()));
  for (std::size_t i = 1; i < s.keys.size(); ++i)
    if (s.keys[i] <= s.keys[i - 1])
      bad_input(
          fmt::format("series \"{}\": period {} {} {}; sort the periods and keep one value "
                      "per period",
                      input.name, period_label(f, s.keys[i]),
                      s.keys[i] == s.keys[i - 1] ? "appears twice after" : "comes after",
                      period_label(f, s.keys[i - 1])));
}

void check_names(const std::vector<std::string>& names) {
  for (std::size_t i = 0; i < names.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (names[i] == names[j])
        bad_input(
            fmt::format("two inputs are named \"{}\"; give each input its own name", names[i]));
}

InputCoverage coverage_of(const NamedSeries& input) {
  InputCoverage c;
  c.name = input.name;
  const PeriodSeries& s = input.series;
  // The first and the last value from either end: usually the ends themselves.
  const auto present = [](double v) { return !std::isnan(v); };
  const auto first = std::find_if(s.values.begin(), s.values.end(), present);
  if (first == s.values.end()) return c;
  const auto last = std::find_if(s.values.rbegin(), s.values.rend(), present);
  c.first = s.keys[static_cast<std::size_t>(first - s.values.begin())];
  c.last = s.keys[static_cast<std::size_t>(s.values.rend() - last) - 1];
  return c;
}

std::vector<std::int64_t> merge_keys(const std::vector<std::int64_t>& a,
                                     const std::vector<std::int64_t>& b) {
  std::vector<std::int64_t> out;
  out.reserve(std::max(a.size(), b.size()));
  std::set_union(a.begin(), a.end(), b.begin(), b.end(), std::back_inserter(out));
  return out;
}

// Spreads values on `keys` over `onto` (a superset of keys, both ascending), NaN where absent.
std::vector<double> spread(const std::vector<std::int64_t>& keys, const std::vector<double>& values,
                           const std::vector<std::int64_t>& onto) {
  std::vector<double> out(onto.size(), kNaN);
  std::size_t j = 0;
  for (std::size_t i = 0; i < onto.size() && j < keys.size(); ++i) {
    if (keys[j] == onto[i]) out[i] = values[j++];
  }
  return out;
}

std::string join_missing(const std::vector<std::string>& names) {
  std::string text;
  for (std::size_t i = 0; i < names.size(); ++i) {
    if (i > 0) text += i + 1 == names.size() ? " and " : ", ";
    text += names[i];
  }
  return text + " missing";
}

// Classifies the union keys and builds the aligned result; columns[j][i] at keys[i].
Aligned classify(Frequency f, const std::vector<std::int64_t>& keys,
                 const std::vector<std::string>& names,
                 const std::vector<const std::vector<double>*>& columns,
                 std::vector<InputCoverage> coverage, const AlignOptions& options) {
  Aligned out;
  out.frequency = f;
  out.names = names;
  std::vector<std::int64_t> kept;
  std::vector<std::vector<double>> kept_columns(columns.size());
  kept.reserve(keys.size());
  for (auto& c : kept_columns) c.reserve(keys.size());

  const std::int64_t lo =
      options.from ? period_key(f, *options.from) : std::numeric_limits<std::int64_t>::min();
  const std::int64_t hi =
      options.to ? period_key(f, *options.to) : std::numeric_limits<std::int64_t>::max();
  std::int64_t common_first = std::numeric_limits<std::int64_t>::min();
  std::int64_t common_last = std::numeric_limits<std::int64_t>::max();
  for (const InputCoverage& c : coverage) {
    if (!c.first) {  // an input without any value: nothing is common
      common_first = std::numeric_limits<std::int64_t>::max();
      common_last = std::numeric_limits<std::int64_t>::min();
      break;
    }
    common_first = std::max(common_first, *c.first);
    common_last = std::min(common_last, *c.last);
  }

  AlignReport& report = out.report;
  std::size_t dropped_since_kept = 0;
  std::vector<std::string> missing;
  for (std::size_t i = 0; i < keys.size(); ++i) {
    const std::int64_t key = keys[i];
    missing.clear();
    for (std::size_t j = 0; j < columns.size(); ++j)
      if (std::isnan((*columns[j])[i])) missing.push_back(names[j]);

    std::string reason;
    if (key < lo || key > hi) {
      reason = "outside the requested range";
      missing.clear();
    } else if (key < common_first || key > common_last) {
      reason = "outside the common range";
    } else if (!missing.empty()) {
      reason = join_missing(missing);
    }
    if (!reason.empty()) {
      ++report.dropped_by_reason[reason];
      report.dropped.push_back({key, period_label(f, key), std::move(reason), missing});
      ++dropped_since_kept;
      continue;
    }

    if (!kept.empty()) {
      const std::int64_t prev = kept.back();
      std::int64_t count = 0;
      bool gap = false;
      if (f == Frequency::daily) {
        count = weekdays_between(static_cast<Day>(prev + 1), static_cast<Day>(key - 1));
        // Dropped days fall between; report at least that many missing.
        count = std::max<std::int64_t>(count, static_cast<std::int64_t>(dropped_since_kept));
        gap = dropped_since_kept > 0 || count >= 3;
      } else {
        count = key - prev - 1;
        gap = count > 0;
      }
      if (gap)
        report.gaps.push_back({prev, key, count,
                               fmt::format("{} missing between {} and {}", count_label(f, count),
                                           period_label(f, prev), period_label(f, key))});
    }
    dropped_since_kept = 0;
    kept.push_back(key);
    for (std::size_t j = 0; j < columns.size(); ++j) kept_columns[j].push_back((*columns[j])[i]);
  }
  report.coverage = std::move(coverage);
  out.keys = std::make_shared<const std::vector<std::int64_t>>(std::move(kept));
  for (auto& c : kept_columns)
    out.columns.push_back(std::make_shared<const std::vector<double>>(std::move(c)));
  return out;
}

}  // namespace

const std::vector<double>& Aligned::column(const std::string& name) const {
  for (std::size_t j = 0; j < names.size(); ++j)
    if (names[j] == name) return *columns[j];
  throw Error(Failure::internal, fmt::format("aligned sample has no input named \"{}\"", name));
}

Aligned align(const std::vector<NamedSeries>& inputs, const AlignOptions& options) {
  if (inputs.empty()) return {};
  const Frequency f = inputs.front().series.frequency;
  std::vector<std::string> names;
  std::vector<std::int64_t> keys;
  std::vector<InputCoverage> coverage;
  for (const NamedSeries& in : inputs) {
    validate(in, f);
    names.push_back(in.name);
    keys.insert(keys.end(), in.series.keys.begin(), in.series.keys.end());
    coverage.push_back(coverage_of(in));
  }
  check_names(names);
  std::sort(keys.begin(), keys.end());
  keys.erase(std::unique(keys.begin(), keys.end()), keys.end());

  std::vector<std::vector<double>> spread_columns;
  spread_columns.reserve(inputs.size());
  std::vector<const std::vector<double>*> columns;
  for (const NamedSeries& in : inputs) {
    spread_columns.push_back(spread(in.series.keys, in.series.values, keys));
    columns.push_back(&spread_columns.back());
  }
  return classify(f, keys, names, columns, std::move(coverage), options);
}

CommonSample::CommonSample(const std::vector<NamedSeries>& shared, const AlignOptions& options)
    : options_(options) {
  if (shared.empty()) return;
  frequency_ = shared.front().series.frequency;
  for (const NamedSeries& in : shared) {
    validate(in, frequency_);
    names_.push_back(in.name);
    coverage_.push_back(coverage_of(in));
    keys_ = merge_keys(keys_, in.series.keys);
  }
  check_names(names_);
  for (const NamedSeries& in : shared)
    values_.push_back(spread(in.series.keys, in.series.values, keys_));

  std::vector<const std::vector<double>*> columns;
  for (const auto& v : values_) columns.push_back(&v);
  shared_alone_ = classify(frequency_, keys_, names_, columns, coverage_, options_);
  kept_positions_.reserve(shared_alone_.keys->size());
  std::size_t i = 0;
  for (const std::int64_t key : *shared_alone_.keys) {
    while (keys_[i] != key) ++i;
    kept_positions_.push_back(i);
  }
}

Aligned CommonSample::align(const NamedSeries& first) const {
  const Frequency f = names_.empty() ? first.series.frequency : frequency_;
  validate(first, f);
  std::vector<std::string> names{first.name};
  names.insert(names.end(), names_.begin(), names_.end());
  check_names(names);
  std::vector<InputCoverage> coverage{coverage_of(first)};
  coverage.insert(coverage.end(), coverage_.begin(), coverage_.end());

  // A series finite on every shared key cannot drop a period or narrow the common range, so
  // the shared inputs' own alignment stands, with the series' values added in front.
  const auto& values = first.series.values;
  if (!names_.empty() && first.series.keys == keys_ &&
      std::none_of(values.begin(), values.end(), [](double v) { return std::isnan(v); })) {
    Aligned out;
    out.frequency = f;
    out.keys = shared_alone_.keys;
    out.names = std::move(names);
    std::vector<double> own;
    own.reserve(kept_positions_.size());
    for (const std::size_t i : kept_positions_) own.push_back(values[i]);
    out.columns.reserve(1 + values_.size());
    out.columns.push_back(std::make_shared<const std::vector<double>>(std::move(own)));
    out.columns.insert(out.columns.end(), shared_alone_.columns.begin(),
                       shared_alone_.columns.end());
    out.report = shared_alone_.report;
    out.report.coverage = std::move(coverage);
    return out;
  }

  const std::vector<std::int64_t> keys = merge_keys(first.series.keys, keys_);
  const std::vector<double> own = spread(first.series.keys, first.series.values, keys);
  std::vector<std::vector<double>> respread;  // shared columns on the new key set, if it grew
  std::vector<const std::vector<double>*> columns{&own};
  if (keys.size() == keys_.size()) {
    for (const auto& v : values_) columns.push_back(&v);
  } else {
    respread.reserve(values_.size());
    for (const auto& v : values_) {
      respread.push_back(spread(keys_, v, keys));
      columns.push_back(&respread.back());
    }
  }
  return classify(f, keys, names, columns, std::move(coverage), options_);
}

std::vector<std::int64_t> period_keys_between(Frequency f, Day from, Day to) {
  std::vector<std::int64_t> out;
  if (to < from) return out;
  const std::int64_t last = period_key(f, to);
  for (std::int64_t k = period_key(f, from); k <= last; ++k) out.push_back(k);
  return out;
}

std::string count_label(Frequency f, std::int64_t n) {
  const std::string unit = f == Frequency::daily ? "business day" : period_noun(f);
  return fmt::format("{} {}{}", n, unit, n == 1 ? "" : "s");
}

}  // namespace alphatrail::core
