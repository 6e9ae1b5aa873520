#include "ledger/content.h"

#include <fmt/format.h>

#include <charconv>
#include <cmath>

#include "core/error.h"
#include "core/sha256.h"

namespace alphatrail::ledger {

namespace {

void append_date(std::string& out, core::Day day) {
  const core::CivilDate c = core::to_civil(day);
  char text[10];
  int y = c.year;
  for (int i = 3; i >= 0; --i, y /= 10) text[i] = static_cast<char>('0' + y % 10);
  text[4] = '-';
  text[5] = static_cast<char>('0' + c.month / 10);
  text[6] = static_cast<char>('0' + c.month % 10);
  text[7] = '-';
  text[8] = static_cast<char>('0' + c.day / 10);
  text[9] = static_cast<char>('0' + c.day % 10);
  out.append(text, 10);
}

[[noreturn]] void malformed(const std::string& name, std::size_t at) {
  throw Error(ExitCode::ledger,
              fmt::format("stored observations of column '{}' are malformed at byte {}; run "
                          "`alphatrail verify` and restore the ledger from a copy",
                          name, at));
}

}  // namespace

std::string encode_values_json(const ColumnData& column) {
  std::string out;
  out.reserve(column.dates.size() * 24 + 2);
  out += '{';
  for (std::size_t i = 0; i < column.dates.size(); ++i) {
    if (i > 0) out += ',';
    out += '"';
    append_date(out, column.dates[i]);
    out += "\":";
    const double v = column.values[i];
    if (std::isnan(v))
      out += "null";
    else
      fmt::format_to(std::back_inserter(out), "{}", v);  // shortest round-trip form
  }
  out += '}';
  return out;
}

ColumnData decode_values_json(const std::string& name, std::string_view json) {
  ColumnData column;
  column.name = name;
  column.dates.reserve(json.size() / 24);
  column.values.reserve(json.size() / 24);
  std::size_t i = 0;
  const auto expect = [&](char c) {
    if (i >= json.size() || json[i] != c) malformed(name, i);
    ++i;
  };
  expect('{');
  if (i < json.size() && json[i] == '}') return column;
  while (true) {
    expect('"');
    if (i + 10 > json.size()) malformed(name, i);
    const auto date = core::parse_date(json.substr(i, 10));
    if (date.status != core::DateParse::ok || date.month_only) malformed(name, i);
    i += 10;
    expect('"');
    expect(':');
    double value = NAN;
    if (json.substr(i, 4) == "null") {
      i += 4;
    } else {
      const auto [end, ec] = std::from_chars(json.data() + i, json.data() + json.size(), value);
      if (ec != std::errc()) malformed(name, i);
      i = static_cast<std::size_t>(end - json.data());
    }
    column.dates.push_back(date.day);
    column.values.push_back(value);
    if (i < json.size() && json[i] == ',') {
      ++i;
      continue;
    }
    expect('}');
    if (i != json.size()) malformed(name, i);
    return column;
  }
}

std::string content_hash(const ContentMeta& meta, const std::vector<EncodedColumn>& columns) {
  core::Sha256 h;
  h.update("alphatrail content v1\nkind: ");
  h.update(meta.kind);
  h.update("\nunit: ");
  h.update(meta.unit);
  h.update("\nquote: ");
  h.update(meta.quote.value_or("none"));
  h.update("\n");
  for (const auto& c : columns) {
    h.update("column: ");
    h.update(c.name);
    h.update("\n");
    h.update(c.values_json);
    h.update("\n");
  }
  return h.hex();
}

}  // namespace alphatrail::ledger
