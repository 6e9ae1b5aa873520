#include "core/series_file.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <exception>
#include <limits>
#include <numeric>
#include <system_error>
#include <thread>
#include <unordered_map>

#include "core/csv.h"
#include "core/error.h"
#include "core/parallel.h"
#include "core/text.h"

namespace alphatrail::core {

ValueUnit default_unit(SeriesKind kind) {
  return kind == SeriesKind::rate ? ValueUnit::percent : ValueUnit::decimal;
}

bool is_tenor(std::string_view name) {
  if (name.size() < 2 || name[0] == '0') return false;
  for (std::size_t i = 0; i + 1 < name.size(); ++i)
    if (name[i] < '0' || name[i] > '9') return false;
  switch (name.back()) {
    case 'D':
    case 'W':
    case 'M':
    case 'Y':
    case 'd':
    case 'w':
    case 'm':
    case 'y': return true;
    default: return false;
  }
}

namespace {

constexpr double kMissing = std::numeric_limits<double>::quiet_NaN();
constexpr const char* kHeaderFix = "add a header row naming the date column and each series";
constexpr const char* kDateFix = "write dates as YYYY-MM-DD or YYYY-MM";
constexpr const char* kMissingFix = "leave the cell empty or write NA when a value is missing";
// Below this size one thread reads faster than starting another.
constexpr std::size_t kParallelBytes = std::size_t{1} << 20;
constexpr unsigned kMaxThreads = 8;           // chosen automatically
constexpr unsigned kMaxExplicitThreads = 64;  // asked for in the options

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

bool all_blank(const std::vector<std::string_view>& fields) {
  return std::all_of(fields.begin(), fields.end(),
                     [](std::string_view f) { return trim(f).empty(); });
}

// Quotes cell text for a message, shortened so a runaway cell cannot flood the terminal.
std::string quoted(std::string_view text) {
  if (text.size() > 40) return fmt::format("'{}...'", text.substr(0, 37));
  return fmt::format("'{}'", text);
}

// The fix of a problem of a column name in the header.
const char* header_name_fix(TextFault fault) {
  switch (fault) {
    case TextFault::not_utf8: return "save the file as UTF-8, or rename the column in the header";
    case TextFault::control: return "rename the column in the header: a name must fit on one line";
    case TextFault::blank: return "rename the column in the header with a visible name";
    case TextFault::outer_space:
      return "rename the column in the header without the white space around it";
  }
  return "rename the column in the header";
}

std::string month_or_day(Day day, bool month_only) {
  std::string text = format_date(day);
  return month_only ? text.substr(0, 7) : text;
}

std::string join_names(const std::vector<std::string>& names) {
  std::string out;
  for (const auto& name : names) {
    if (!out.empty()) out += ", ";
    out += name.empty() ? "(unnamed)" : name;
  }
  return out;
}

enum class Cell { value, missing, not_number, not_finite, percent_sign };

// Compares `a` with the upper-case `b`, ignoring the case of `a`.
bool equals_ignoring_case(std::string_view a, std::string_view b) {
  return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(), [](char x, char y) {
           return (x >= 'a' && x <= 'z' ? x - 32 : x) == y;
         });
}

// Parses a plain decimal "[-]digits[.digits]" whose digits form an integer m up to 2^53 with at
// most 22 decimals. Then m and 10^k are exact doubles and one IEEE division rounds m / 10^k
// correctly (Clinger's fast path), so the result equals std::from_chars's; returns false for
// anything else, which from_chars then handles.
bool parse_plain_decimal(const char* p, const char* end, double& value) {
  static constexpr double kPowers[] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                       1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                       1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
  const bool negative = p < end && *p == '-';
  if (negative) ++p;
  std::uint64_t m = 0;
  int digits = 0;
  int decimals = 0;
  for (; p < end && static_cast<unsigned>(*p - '0') < 10; ++p, ++digits)
    m = m * 10 + static_cast<unsigned>(*p - '0');
  if (p < end && *p == '.') {
    const char* first = ++p;
    for (; p < end && static_cast<unsigned>(*p - '0') < 10; ++p)
      m = m * 10 + static_cast<unsigned>(*p - '0');
    decimals = static_cast<int>(p - first);
    digits += decimals;
  }
  if (p != end || digits == 0 || digits > 19 || decimals > 22) return false;
  if (m > (std::uint64_t{1} << 53)) return false;
  const double v = static_cast<double>(m) / kPowers[decimals];
  value = negative ? -v : v;
  return true;
}

// Parses one value cell: a number, or missing when empty or NA.
Cell parse_cell(std::string_view text, double& value) {
  if (parse_plain_decimal(text.data(), text.data() + text.size(), value)) return Cell::value;
  if (!text.empty()) {
    const auto [ptr, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
    if (ec == std::errc() && ptr == text.data() + text.size())
      return std::isfinite(value) ? Cell::value : Cell::not_finite;
  }
  std::string_view t = trim(text);
  if (t.empty() || equals_ignoring_case(t, "NA") || equals_ignoring_case(t, "N/A"))
    return Cell::missing;
  if (t.size() > 1 && t[0] == '+' && t[1] != '-' && t[1] != '+') t.remove_prefix(1);
  const auto [ptr, ec] = std::from_chars(t.data(), t.data() + t.size(), value);
  if (ptr == t.data() + t.size()) {
    if (ec == std::errc()) return std::isfinite(value) ? Cell::value : Cell::not_finite;
    if (ec == std::errc::result_out_of_range) {
      // Too large is no finite number; too small (1e-999) rounds to zero as strtod does.
      value = std::strtod(std::string(t).c_str(), nullptr);
      return std::isfinite(value) ? Cell::value : Cell::not_finite;
    }
  }
  if (t.back() == '%') return Cell::percent_sign;
  return Cell::not_number;
}

// Where each field of a row goes, decided from the header.
struct Layout {
  std::string file;
  std::size_t width = 0;                  // fields per row
  std::size_t date_field = 0;             // 0-based
  std::vector<std::size_t> value_fields;  // the selected series, in file order
  std::vector<std::string> names;         // their final names
  SeriesKind kind = SeriesKind::strategy;
  ValueUnit unit = ValueUnit::decimal;
  double rate_low = 0;  // plausible rate range in the file's unit
  double rate_high = 0;
  bool allow_large_returns = false;
};

// The rows of the file in file order, filled by parts of the file at known row offsets.
struct Table {
  std::vector<Day> dates;
  std::vector<long> lines;
  std::vector<unsigned char> month_only;
  std::vector<double*> columns;  // the values of each series, one row per index
};

Layout make_layout(const std::string& file, const CsvRecord& header,
                   const SeriesFileOptions& options) {
  Layout layout;
  layout.file = file;
  layout.kind = options.kind;
  layout.unit = options.unit;
  layout.allow_large_returns = options.allow_large_returns;
  layout.width = header.fields.size();
  const long line = header.line;
  std::vector<std::string> names;
  names.reserve(header.fields.size());
  for (auto f : header.fields) names.emplace_back(trim(f));

  if (all_blank(header.fields))
    throw InputError(file, line, 0, "the first line is blank where the header row belongs",
                     "remove the blank lines above the header row");

  auto find = [&](std::string_view name) -> std::vector<std::size_t> {
    std::vector<std::size_t> found;
    for (std::size_t i = 0; i < names.size(); ++i)
      if (names[i] == name) found.push_back(i);
    return found;
  };
  auto ambiguous = [&](const std::vector<std::size_t>& found) {
    return InputError(
        file, line, static_cast<long>(found[1]) + 1,
        fmt::format("column name '{}' appears twice in the header (columns {} and {})",
                    names[found[0]], found[0] + 1, found[1] + 1),
        "give each series a unique name in the header row");
  };

  std::vector<bool> selected(names.size(), false);
  if (!options.date_column.empty()) {
    const auto found = find(trim(options.date_column));
    if (found.empty())
      throw InputError(file, line, 0,
                       fmt::format("no column named '{}'; the header has: {}",
                                   trim(options.date_column), join_names(names)),
                       "pass --date-column with one of these names");
    if (found.size() > 1) throw ambiguous(found);
    layout.date_field = found[0];
  } else if (parse_date(names[0]).status != DateParse::malformed) {
    throw InputError(
        file, line, 1,
        fmt::format("the first row starts with the date {} where a header belongs", names[0]),
        kHeaderFix);
  }

  if (options.columns.empty()) {
    for (std::size_t i = 0; i < names.size(); ++i) selected[i] = i != layout.date_field;
  } else {
    for (const auto& wanted : options.columns) {
      const auto found = find(trim(wanted));
      if (found.empty())
        throw InputError(file, line, 0,
                         fmt::format("no column named '{}'; the header has: {}", trim(wanted),
                                     join_names(names)),
                         "pass --columns with names from the header");
      if (found.size() > 1) throw ambiguous(found);
      if (found[0] == layout.date_field)
        throw InputError(file, line, static_cast<long>(found[0]) + 1,
                         fmt::format("'{}' is the date column, not a series", names[found[0]]),
                         "leave it out of --columns");
      selected[found[0]] = true;
    }
  }

  // Unselected columns may be unnamed or share a name: they are never read.
  std::unordered_map<std::string_view, std::size_t> first_of;
  for (std::size_t i = 0; i < names.size(); ++i) {
    const bool used = selected[i] || i == layout.date_field;
    if (names[i].empty()) {
      if (selected[i])
        throw InputError(file, line, static_cast<long>(i) + 1,
                         fmt::format("column {} has no name in the header", i + 1), kHeaderFix);
      continue;
    }
    const auto [it, inserted] = first_of.emplace(names[i], i);
    if (!inserted && (used || selected[it->second] || it->second == layout.date_field))
      throw ambiguous({it->second, i});
  }

  for (std::size_t i = 0; i < names.size(); ++i)
    if (selected[i]) {
      layout.value_fields.push_back(i);
      layout.names.push_back(names[i]);
    }
  // Names are stored: text a JSON writer cannot write would break every JSON output of the
  // ledger, and a name with a line break could not be typed on a command line, would break
  // table output and could forge the "column: NAME" lines the content hash is made of.
  if (options.rename.empty()) {
    for (std::size_t j = 0; j < layout.names.size(); ++j)
      if (const auto problem = name_problem(layout.names[j]))
        throw InputError(file, line, static_cast<long>(layout.value_fields[j]) + 1,
                         fmt::format("column name '{}': {}", printable_text(layout.names[j]),
                                     describe_text_problem(*problem)),
                         header_name_fix(problem->fault));
  }
  if (layout.value_fields.empty())
    throw InputError(file, line, 0, "the header names only the date column",
                     "add a column for each series next to the date column");

  if (!options.rename.empty()) {
    if (layout.names.size() != 1)
      throw InputError(file, 0, 0,
                       fmt::format("a new name fits a single series, but the file has {}: {}",
                                   layout.names.size(), join_names(layout.names)),
                       "pick one column with --columns, or keep the names of the header");
    if (const auto problem = name_problem(options.rename))
      throw InputError(file, 0, 0,
                       fmt::format("the new name '{}': {}", printable_text(options.rename),
                                   describe_text_problem(*problem)),
                       text_problem_fix(problem->fault));
    layout.names[0] = options.rename;
  }

  if (options.kind == SeriesKind::rate) {
    for (std::size_t j = 0; j < layout.names.size(); ++j) {
      std::string& name = layout.names[j];
      if (!is_tenor(name)) {
        if (!options.rename.empty())
          throw InputError(file, 0, 0, fmt::format("'{}' is not a tenor", name),
                           "give a tenor: a number and D, W, M or Y, such as 1M, 3M, 13W, 1Y");
        throw InputError(file, line, static_cast<long>(layout.value_fields[j]) + 1,
                         fmt::format("rate column '{}' is not a tenor", name),
                         "name each rate column by its tenor, a number and D, W, M or Y (1M, "
                         "3M, 13W, 1Y), or give the tenor of a single-column file with --tenor");
      }
      // One spelling per tenor, so "1m" and "1M" are one series.
      for (char& c : name)
        if (c >= 'a' && c <= 'z') c = static_cast<char>(c - 32);
    }
    const bool percent = options.unit == ValueUnit::percent;
    layout.rate_low = percent ? -5.0 : -0.05;
    layout.rate_high = percent ? 50.0 : 0.5;
  }
  return layout;
}

// Checks a parsed value and states it in the result's unit.
double convert(const Layout& layout, double v, std::string_view text, long line, long column) {
  if (layout.kind == SeriesKind::rate) {
    if (v < layout.rate_low || v > layout.rate_high) {
      const bool percent = layout.unit == ValueUnit::percent;
      throw InputError(
          layout.file, line, column,
          fmt::format("rate {} is outside the plausible range {} to {} ({})", trim(text),
                      layout.rate_low, layout.rate_high, value_unit_name(layout.unit)),
          percent ? "check the value; if the file states decimals (0.05 for 5%), pass --decimal"
                  : "check the value; if the file states percent (5 for 5%), leave out --decimal");
    }
    return v;
  }
  switch (layout.unit) {
    case ValueUnit::decimal:
      if (v <= -1)
        throw InputError(layout.file, line, column,
                         fmt::format("return {} is -100% or less", trim(text)),
                         "check the value, a simple return must be above -1; if the file states "
                         "percent, pass --percent; if it states prices, pass --levels");
      return v;
    case ValueUnit::percent:
      v /= 100;  // dividing (not multiplying by 0.01) keeps 1.5% exactly 0.015
      if (v <= -1)
        throw InputError(layout.file, line, column,
                         fmt::format("return {}% is -100% or less", trim(text)),
                         "check the value, a simple return must be above -100%");
      return v;
    case ValueUnit::levels:
      if (v <= 0)
        throw InputError(layout.file, line, column,
                         fmt::format("level {} is zero or below", trim(text)),
                         "levels (prices, NAV) must be positive; if these are returns, leave "
                         "out --levels");
      return v;
  }
  return v;
}

InputError blank_line(const std::string& file, long line) {
  return InputError(file, line, 0, "the line is blank", "remove the blank line between the rows");
}

// Parses the rows of one part into the table from row `first_row` on; returns the number of
// rows read.
std::size_t parse_rows(CsvReader reader, const Layout& layout, std::size_t first_row,
                       Table& table) {
  const std::string& file = layout.file;
  const std::size_t series = layout.value_fields.size();
  const long date_column = static_cast<long>(layout.date_field) + 1;
  std::size_t row = first_row;
  CsvRecord record;
  record.fields.reserve(layout.width);
  while (reader.next(record)) {
    const auto& fields = record.fields;
    const long line = record.line;
    if (fields.size() != layout.width) {
      if (all_blank(fields)) throw blank_line(file, line);
      throw InputError(
          file, line, 0,
          fmt::format("the row has {} fields but the header has {}", fields.size(), layout.width),
          "give every row one field per header column; leave a cell empty when "
          "a value is missing");
    }
    const std::string_view date_text = trim(fields[layout.date_field]);
    const ParsedDate date = parse_date(date_text);
    if (date.status != DateParse::ok) {
      if (date_text.empty()) {
        if (all_blank(fields)) throw blank_line(file, line);
        throw InputError(file, line, date_column, "the date is empty",
                         "fill in the date (YYYY-MM-DD or YYYY-MM) or remove the row");
      }
      if (date.status == DateParse::impossible)
        throw InputError(file, line, date_column,
                         fmt::format("{} is not a calendar date", date_text),
                         "check the day and the month");
      throw InputError(file, line, date_column, fmt::format("{} is not a date", quoted(date_text)),
                       kDateFix);
    }
    table.dates[row] = date.day;
    table.lines[row] = line;
    table.month_only[row] = date.month_only ? 1 : 0;

    for (std::size_t j = 0; j < series; ++j) {
      const std::size_t field = layout.value_fields[j];
      const std::string_view text = fields[field];
      const long column = static_cast<long>(field) + 1;
      double v = 0;
      switch (parse_cell(text, v)) {
        case Cell::value: table.columns[j][row] = convert(layout, v, text, line, column); break;
        case Cell::missing: table.columns[j][row] = kMissing; break;
        case Cell::not_finite:
          throw InputError(file, line, column,
                           fmt::format("{} is not a finite number", quoted(trim(text))),
                           kMissingFix);
        case Cell::percent_sign:
          throw InputError(file, line, column,
                           fmt::format("{} is not a number", quoted(trim(text))),
                           layout.kind == SeriesKind::rate
                               ? "drop the percent sign; rates are read as percent by default"
                               : "drop the percent sign and pass --percent");
        case Cell::not_number:
          throw InputError(file, line, column,
                           fmt::format("{} is not a number", quoted(trim(text))),
                           "write plain numbers such as 0.0123 or -1.5e-3; leave the cell "
                           "empty or write NA when a value is missing");
      }
    }
    ++row;
  }
  return row - first_row;
}

double median_of(std::vector<double>& v) {
  const auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  if (v.size() % 2 == 1) return *mid;
  return (*std::max_element(v.begin(), mid) + *mid) / 2;
}

// Rejects a column of returns that are more likely percent or levels: the guide's rule, a
// typical (median) absolute return above 1 when decimals are declared. `values` are decimal
// returns, NaN for missing.
void check_return_scale(const Layout& layout, std::size_t j, const std::vector<double>& values,
                        long header_line) {
  if (layout.kind == SeriesKind::rate || layout.unit == ValueUnit::levels) return;
  // Declared percent, a median move of 50% a period is no return series either: most likely
  // levels (an index near 100 would otherwise sit right at the limit of 1).
  const double limit = layout.unit == ValueUnit::percent ? 0.5 : 1.0;
  // Counting values above the limit settles the median without sorting, except at a tie.
  std::size_t count = 0;
  std::size_t above = 0;
  bool all_positive = true;
  for (const double x : values) {
    if (std::isnan(x)) continue;
    ++count;
    above += std::fabs(x) > limit ? 1 : 0;
    all_positive = all_positive && x > 0;
  }
  if (2 * above < count) return;
  std::vector<double> magnitudes;
  magnitudes.reserve(count);
  for (const double x : values)
    if (!std::isnan(x)) magnitudes.push_back(std::fabs(x));
  const double median = median_of(magnitudes);
  if (median <= limit) return;
  const std::string& name = layout.names[j];
  const long column = static_cast<long>(layout.value_fields[j]) + 1;
  if (layout.unit == ValueUnit::percent)
    throw InputError(layout.file, header_line, column,
                     fmt::format("column '{}' looks like levels, not percent returns (median "
                                 "|value| {:.4g})",
                                 name, median * 100),
                     "pass --levels if these are prices");
  if (all_positive)
    throw InputError(layout.file, header_line, column,
                     fmt::format("column '{}' looks like levels, not returns (all values "
                                 "positive, median {:.4g})",
                                 name, median),
                     "pass --levels if these are prices, or --percent if they are percent returns");
  throw InputError(
      layout.file, header_line, column,
      fmt::format("column '{}' looks like percent (median |value| {:.4g})", name, median),
      "pass --percent, or --levels if these are prices");
}

constexpr const char* kLargeReturnFix = "if the return is right, pass --allow-large-returns";

// Checks the returns r_t = P_t / P_{t-1} - 1 that a column of levels in date order gives (NaN
// for missing), before they replace the levels: valid levels can still give no valid return
// (100 then 1e-300 rounds to -1, 1e-300 then 1e300 overflows), and a return above
// kLargestReturn needs the option. Points at the level that produced the return.
void check_level_returns(const Layout& layout, std::size_t j, const std::vector<double>& levels,
                         const std::vector<long>& lines, const std::vector<std::size_t>& order) {
  const long column = static_cast<long>(layout.value_fields[j]) + 1;
  for (std::size_t i = 1; i < levels.size(); ++i) {
    const double r = levels[i] / levels[i - 1] - 1;
    if (std::isnan(r) || (r > -1 && r <= kLargestReturn)) continue;
    if (std::isfinite(r) && r > -1 && layout.allow_large_returns) continue;
    const long line = lines[order[i]];
    const std::string what =
        fmt::format("level {} after {} on line {}", levels[i], levels[i - 1], lines[order[i - 1]]);
    if (!std::isfinite(r))
      throw InputError(layout.file, line, column, what + " gives a return too large to represent",
                       "check the levels");
    if (r <= -1)
      throw InputError(layout.file, line, column, what + " gives a return of -100% or less",
                       "check the level: a simple return must be above -100%");
    throw InputError(
        layout.file, line, column,
        fmt::format("{} gives a return of {:+.4g}%, above +1,000% in one period", what, 100 * r),
        "check the level; if it is right, pass --allow-large-returns");
  }
}

// Refuses a return above kLargestReturn in a column of returns (decimal, percent divided by
// 100) unless the option allows it: one period's +1,000% is far more often a wrong value or a
// wrong unit than a real return. `values` are in date order; rates have their own range.
void check_large_returns(const Layout& layout, std::size_t j, const std::vector<double>& values,
                         const std::vector<long>& lines, const std::vector<std::size_t>& order) {
  if (layout.kind == SeriesKind::rate || layout.unit == ValueUnit::levels ||
      layout.allow_large_returns)
    return;
  const long column = static_cast<long>(layout.value_fields[j]) + 1;
  for (std::size_t i = 0; i < values.size(); ++i) {
    const double r = values[i];
    if (!(r > kLargestReturn)) continue;
    if (layout.unit == ValueUnit::percent)
      throw InputError(layout.file, lines[order[i]], column,
                       fmt::format("return {:.6g}% is above +1,000% in one period", 100 * r),
                       fmt::format("check the value; {}", kLargeReturnFix));
    throw InputError(layout.file, lines[order[i]], column,
                     fmt::format("return {} ({:+.4g}%) is above +1,000% in one period", r, 100 * r),
                     fmt::format("check the value; if the file states percent, pass --percent; {}",
                                 kLargeReturnFix));
  }
}

unsigned thread_count(const SeriesFileOptions& options, std::size_t bytes) {
  if (options.threads > 0) return std::min(options.threads, kMaxExplicitThreads);
  if (bytes < kParallelBytes) return 1;
  return std::clamp(std::thread::hardware_concurrency(), 1u, kMaxThreads);
}

}  // namespace

SeriesFile parse_series_file(const std::string& display_name, std::string_view content,
                             const SeriesFileOptions& options) {
  if (options.kind == SeriesKind::rate && options.unit == ValueUnit::levels)
    throw Error(Failure::invalid_argument, "rates are read as percent or decimal, not as levels");

  CsvReader reader(display_name, content);
  CsvRecord header;
  if (!reader.next(header))
    throw InputError(display_name, 0, 0, "the file is empty",
                     "write a header row naming the date column and each series, then one row "
                     "per date");
  const long header_line = header.line;
  const Layout layout = make_layout(display_name, header, options);

  // Without quotes every line end ends a record, so the rows can be cut at line ends.
  const unsigned threads = thread_count(options, content.size());
  std::vector<CsvReader> parts;
  if (threads > 1 && reader.rest_is_unquoted()) parts = reader.split(threads);
  if (parts.empty()) parts.push_back(reader);

  // Each part owns a block of rows as long as its lines (one more for the last line, which
  // may lack a line end), so the parts write straight into one table in file order.
  std::vector<std::size_t> first_row(parts.size() + 1, 0);
  run_parallel(parts.size(), [&](std::size_t k) { first_row[k + 1] = parts[k].count_line_ends(); });
  first_row.back() += 1;
  for (std::size_t k = 1; k < first_row.size(); ++k) first_row[k] += first_row[k - 1];
  const std::size_t capacity = first_row.back();

  const std::size_t series = layout.value_fields.size();
  SeriesFile result;
  result.columns.resize(series);
  Table table;
  table.dates.resize(capacity);
  table.lines.resize(capacity);
  table.month_only.resize(capacity);
  table.columns.resize(series);
  const std::size_t tasks = std::min<std::size_t>(threads, series);
  auto for_columns = [&](auto&& work) {
    run_parallel(tasks, [&](std::size_t k) {
      for (std::size_t j = series * k / tasks; j < series * (k + 1) / tasks; ++j) work(j);
    });
  };
  for_columns([&](std::size_t j) {
    result.columns[j].values.resize(capacity);
    table.columns[j] = result.columns[j].values.data();
  });

  std::vector<std::size_t> rows_read(parts.size(), 0);
  run_parallel(parts.size(), [&](std::size_t k) {
    rows_read[k] = parse_rows(parts[k], layout, first_row[k], table);
  });
  // A part reads fewer rows than its lines only when blank lines end the file, and then the
  // parts after it read none; close any gap anyway, so the table never holds a stale row.
  std::size_t n = 0;
  for (std::size_t k = 0; k < parts.size(); ++k) {
    if (first_row[k] != n && rows_read[k] > 0) {
      const auto move_rows = [&](auto& v) {
        std::copy_n(v.begin() + static_cast<std::ptrdiff_t>(first_row[k]), rows_read[k],
                    v.begin() + static_cast<std::ptrdiff_t>(n));
      };
      move_rows(table.dates);
      move_rows(table.lines);
      move_rows(table.month_only);
      for (auto& column : result.columns) move_rows(column.values);
    }
    n += rows_read[k];
  }
  if (n == 0)
    throw InputError(display_name, 0, 0, "the file has a header but no data rows",
                     "add one row per date below the header");
  const std::vector<Day>& dates = table.dates;
  const std::vector<long>& lines = table.lines;
  const std::vector<unsigned char>& month_only = table.month_only;

  const long date_column = static_cast<long>(layout.date_field) + 1;
  for (std::size_t i = 1; i < n; ++i) {
    if (month_only[i] == month_only[0]) continue;
    throw InputError(
        display_name, lines[i], date_column,
        fmt::format("{} is {} but line {} has {} {}", month_or_day(dates[i], month_only[i]),
                    month_only[i] ? "a month" : "a full date", lines[0],
                    month_only[0] ? "a month," : "a full date,",
                    month_or_day(dates[0], month_only[0])),
        "write every date in one form: YYYY-MM-DD or YYYY-MM");
  }

  result.month_only_dates = month_only[0] != 0;

  std::vector<std::size_t> order(n);
  std::iota(order.begin(), order.end(), std::size_t{0});
  std::size_t first_disorder = 0;  // 0: in order
  for (std::size_t i = 1; i < n && first_disorder == 0; ++i)
    if (dates[i] < dates[i - 1]) first_disorder = i;
  if (first_disorder != 0)
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return dates[a] < dates[b]; });
  // Report the repeat met first when reading the file; stable order puts each date's first
  // occurrence at the head of its run.
  std::size_t repeat = n;
  std::size_t original = n;
  for (std::size_t i = 1, head = 0; i < n; ++i) {
    if (dates[order[i]] != dates[order[head]]) {
      head = i;
    } else if (order[i] < repeat) {
      repeat = order[i];
      original = order[head];
    }
  }
  if (repeat < n)
    throw InputError(display_name, lines[repeat], date_column,
                     fmt::format("date {} appears again; first on line {}",
                                 month_or_day(dates[repeat], month_only[repeat]), lines[original]),
                     "keep one row per date");
  if (first_disorder != 0)
    result.notes.push_back(fmt::format(
        "dates were out of order and have been sorted (line {} has {} after {})",
        lines[first_disorder], month_or_day(dates[first_disorder], month_only[first_disorder]),
        month_or_day(dates[first_disorder - 1], month_only[first_disorder - 1])));

  std::vector<Day> sorted_dates(n);
  for (std::size_t i = 0; i < n; ++i) sorted_dates[i] = dates[order[i]];

  for_columns([&](std::size_t j) {
    std::vector<double>& v = result.columns[j].values;
    v.resize(n);
    if (first_disorder != 0) {
      std::vector<double> sorted(n);
      for (std::size_t i = 0; i < n; ++i) sorted[i] = v[order[i]];
      v.swap(sorted);
    }
    if (layout.unit == ValueUnit::levels) {
      check_level_returns(layout, j, v, lines, order);
      // r_t = P_t / P_{t-1} - 1; NaN on either side propagates, so a return after a missing
      // level is missing.
      for (std::size_t i = n - 1; i > 0; --i) v[i] = v[i] / v[i - 1] - 1;
      v[0] = kMissing;
    }
    std::size_t first = 0;
    while (first < n && std::isnan(v[first])) ++first;
    const long column = static_cast<long>(layout.value_fields[j]) + 1;
    if (first == n)
      throw InputError(display_name, header_line, column,
                       layout.unit == ValueUnit::levels
                           ? fmt::format("column '{}' has no return: it needs two levels on "
                                         "consecutive rows",
                                         layout.names[j])
                           : fmt::format("column '{}' has no values", layout.names[j]),
                       "fill it in, or leave it out with --columns");
    std::size_t last = n - 1;
    while (std::isnan(v[last])) --last;
    check_return_scale(layout, j, v, header_line);
    check_large_returns(layout, j, v, lines, order);
    SeriesColumn& out = result.columns[j];
    out.name = layout.names[j];
    out.dates.assign(sorted_dates.begin() + static_cast<std::ptrdiff_t>(first),
                     sorted_dates.begin() + static_cast<std::ptrdiff_t>(last) + 1);
    v.resize(last + 1);
    v.erase(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(first));
  });
  return result;
}

}  // namespace alphatrail::core
