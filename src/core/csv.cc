#include "core/csv.h"

#include <algorithm>
#include <array>
#include <bit>
#include <cstdint>
#include <cstring>
#include <utility>

#include "core/error.h"

namespace alphatrail::core {

namespace {

constexpr std::string_view kByteOrderMark = "\xEF\xBB\xBF";

// Bytes that end an unquoted field's fast scan.
constexpr std::array<bool, 256> kStops = [] {
  std::array<bool, 256> stops{};
  stops[static_cast<unsigned char>(',')] = true;
  stops[static_cast<unsigned char>('\n')] = true;
  stops[static_cast<unsigned char>('"')] = true;
  return stops;
}();

// Returns the position of the first ',', '\n' or '"' in [p, end), or end. Reads eight bytes
// at a time: fields are short, but a word-wide test still beats a test per byte.
const char* find_stop(const char* p, const char* end) {
  if constexpr (std::endian::native == std::endian::little) {
    constexpr std::uint64_t kOnes = 0x0101010101010101ULL;
    constexpr std::uint64_t kHighs = 0x8080808080808080ULL;
    while (end - p >= 8) {
      std::uint64_t word;
      std::memcpy(&word, p, 8);
      // x = word ^ c has a zero byte where word holds c, and (x - 0x01..) & ~x & 0x80.. flags
      // it. Borrows can only flag bytes above a true match, so the lowest flag is exact.
      const std::uint64_t comma = word ^ (kOnes * ',');
      const std::uint64_t newline = word ^ (kOnes * '\n');
      const std::uint64_t quote = word ^ (kOnes * '"');
      const std::uint64_t found =
          ((comma - kOnes) & ~comma) | ((newline - kOnes) & ~newline) | ((quote - kOnes) & ~quote);
      if ((found & kHighs) != 0) return p + std::countr_zero(found & kHighs) / 8;
      p += 8;
    }
  }
  while (p < end && !kStops[static_cast<unsigned char>(*p)]) ++p;
  return p;
}

std::size_t line_ends_in(const char* p, const char* end) {
  std::size_t count = 0;
  while (p < end) {
    const void* nl = std::memchr(p, '\n', static_cast<std::size_t>(end - p));
    if (nl == nullptr) break;
    ++count;
    p = static_cast<const char*>(nl) + 1;
  }
  return count;
}

bool is_blank_byte(char c) {
  return c == ' ' || c == '\t' || c == '\r' || c == '\n' || c == ',';
}

constexpr const char* kQuoteFix =
    "put quotes around the whole field and write a quote inside it as \"\"";

}  // namespace

CsvReader::CsvReader(std::string file_name, std::string_view content)
    : file_name_(std::move(file_name)) {
  if (content.substr(0, kByteOrderMark.size()) == kByteOrderMark)
    content.remove_prefix(kByteOrderMark.size());
  pos_ = content.data();
  end_ = content.data() + content.size();
  file_end_ = end_;
}

bool CsvReader::only_blanks_follow(const char* p) {
  // Remembering where the last look found data keeps a long run of blank lines linear.
  if (p < next_data_) return false;
  while (p < file_end_ && is_blank_byte(*p)) ++p;
  if (p == file_end_) return true;
  next_data_ = p;
  return false;
}

bool CsvReader::next(CsvRecord& record) {
  record.fields.clear();
  unescaped_.clear();
  const char* p = pos_;
  if (p >= end_) return false;
  // Looking ahead only when a line starts with a blank byte keeps the common path free of it.
  if (is_blank_byte(*p) && only_blanks_follow(p)) {
    pos_ = end_;
    return false;
  }
  record.line = line_;
  for (;;) {
    const long column = static_cast<long>(record.fields.size()) + 1;
    if (p < end_ && *p == '"') {
      const long opened_on = line_;
      const char* text = p + 1;
      const char* q = text;
      bool escaped = false;
      const char* close = nullptr;
      for (;;) {
        close = static_cast<const char*>(std::memchr(q, '"', static_cast<std::size_t>(end_ - q)));
        if (close == nullptr)
          throw InputError(file_name_, opened_on, column, "a quoted field is never closed",
                           "add the closing quote; write a quote inside a field as \"\"");
        if (close + 1 < end_ && close[1] == '"') {
          escaped = true;
          q = close + 2;
          continue;
        }
        break;
      }
      line_ += static_cast<long>(line_ends_in(text, close));
      if (escaped) {
        std::string& out = unescaped_.emplace_back();
        out.reserve(static_cast<std::size_t>(close - text));
        for (const char* c = text; c < close; ++c) {
          out.push_back(*c);
          if (*c == '"') ++c;  // the second quote of a "" pair
        }
        record.fields.emplace_back(out);
      } else {
        record.fields.emplace_back(text, static_cast<std::size_t>(close - text));
      }
      p = close + 1;
      if (p == end_) break;
      if (*p == ',') {
        ++p;
        continue;
      }
      if (*p == '\n') {
        ++p;
        ++line_;
        break;
      }
      if (*p == '\r' && (p + 1 == end_ || p[1] == '\n')) {
        p += 1;
        if (p < end_) {
          ++p;
          ++line_;
        }
        break;
      }
      throw InputError(file_name_, line_, column, "text follows the closing quote of a field",
                       kQuoteFix);
    }

    const char* start = p;
    p = find_stop(p, end_);
    if (p < end_ && *p == '"')
      throw InputError(file_name_, line_, column, "a quote inside an unquoted field", kQuoteFix);
    const char* stop = p;
    if (stop > start && stop[-1] == '\r' && (p == end_ || *p == '\n')) --stop;  // CRLF
    record.fields.emplace_back(start, static_cast<std::size_t>(stop - start));
    if (p == end_) break;
    if (*p == ',') {
      ++p;
      continue;
    }
    ++p;  // '\n'
    ++line_;
    break;
  }
  pos_ = p;
  return true;
}

std::size_t CsvReader::count_line_ends() const {
  return line_ends_in(pos_, end_);
}

bool CsvReader::rest_is_unquoted() const {
  if (pos_ == end_) return true;  // memchr wants a valid pointer even for no bytes
  return std::memchr(pos_, '"', static_cast<std::size_t>(end_ - pos_)) == nullptr;
}

std::vector<CsvReader> CsvReader::split(std::size_t parts) const {
  std::vector<CsvReader> readers;
  if (parts == 0) parts = 1;
  const std::size_t size = static_cast<std::size_t>(end_ - pos_);
  const char* begin = pos_;
  long line = line_;
  for (std::size_t k = 0; k < parts && begin < end_; ++k) {
    const char* stop = end_;
    if (k + 1 < parts) {
      const char* target = std::max(begin, pos_ + size * (k + 1) / parts);
      const void* nl = std::memchr(target, '\n', static_cast<std::size_t>(end_ - target));
      stop = nl == nullptr ? end_ : static_cast<const char*>(nl) + 1;
    }
    CsvReader& part = readers.emplace_back(*this);
    part.pos_ = begin;
    part.end_ = stop;
    part.line_ = line;
    if (stop < end_) line += static_cast<long>(line_ends_in(begin, stop));
    begin = stop;
  }
  return readers;
}

CsvTable read_csv_table(const std::string& file_name, std::string_view content) {
  CsvTable table;
  CsvReader reader(file_name, content);
  CsvRecord record;
  while (reader.next(record)) {
    table.rows.emplace_back(record.fields.begin(), record.fields.end());
    table.lines.push_back(record.line);
  }
  return table;
}

}  // namespace alphatrail::core
