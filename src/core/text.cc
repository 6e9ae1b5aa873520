#include "core/text.h"

#include <fmt/format.h>

#include <cstdint>

namespace alphatrail::core {

namespace {

// One character read from UTF-8, or the reason the bytes at its start are none.
struct Decoded {
  char32_t code_point = 0;
  std::size_t length = 1;       // bytes read: the character's, or those shown for an error
  const char* error = nullptr;  // nullptr: a valid character; "": no reason beyond the bytes
};

constexpr const char* kSurrogate = "a surrogate";

bool is_continuation(unsigned char b) {
  return (b & 0xC0) == 0x80;
}

// Decodes the character at text[i] by the well-formed byte sequences of RFC 3629 (Unicode
// table 3-7). The lead byte gives the length; the continuation bytes present are read before
// the value is judged, so an overlong form, a surrogate or a value above U+10FFFF is named as
// such with all its bytes.
Decoded decode(std::string_view text, std::size_t i) {
  const auto lead = static_cast<unsigned char>(text[i]);
  if (lead < 0x80) return {lead, 1, nullptr};
  if (is_continuation(lead)) return {0, 1, "a continuation byte without a lead byte"};
  if (lead >= 0xF8) return {0, 1, "never used in UTF-8"};
  const std::size_t length = lead >= 0xF0 ? 4 : lead >= 0xE0 ? 3 : 2;
  char32_t cp = lead & (0x7F >> length);
  std::size_t n = 1;
  for (; n < length && i + n < text.size(); ++n) {
    const auto b = static_cast<unsigned char>(text[i + n]);
    if (!is_continuation(b)) break;
    cp = (cp << 6) | (b & 0x3F);
  }
  if (n < length) return {0, n, n == 1 ? "" : "cut short"};
  static constexpr char32_t kSmallest[] = {0, 0, 0x80, 0x800, 0x10000};
  if (cp < kSmallest[length]) return {cp, n, "an overlong encoding"};
  if (cp >= 0xD800 && cp <= 0xDFFF) return {cp, n, kSurrogate};
  if (cp > 0x10FFFF) return {cp, n, "above U+10FFFF"};
  return {cp, n, nullptr};
}

bool is_control(char32_t cp) {
  return cp < 0x20 || (cp >= 0x7F && cp <= 0x9F) || cp == 0x2028 || cp == 0x2029;
}

// White space that is not a control character (Unicode's White_Space property).
bool is_white_space(char32_t cp) {
  return cp == 0x20 || cp == 0xA0 || cp == 0x1680 || (cp >= 0x2000 && cp <= 0x200A) ||
         cp == 0x202F || cp == 0x205F || cp == 0x3000;
}

const char* control_name(char32_t cp) {
  switch (cp) {
    case 0x09: return "a tab";
    case 0x0A: return "a line break";
    case 0x0D: return "a carriage return";
    case 0x7F: return "delete";
    case 0x2028: return "a line separator";
    case 0x2029: return "a paragraph separator";
    default: return nullptr;
  }
}

std::string bytes_of(std::string_view text, std::size_t i, std::size_t n) {
  std::string out;
  for (std::size_t k = 0; k < n; ++k)
    out += fmt::format("{}0x{:02x}", k == 0 ? "" : " ", static_cast<unsigned char>(text[i + k]));
  return out;
}

std::string code_point_name(char32_t cp) {
  return fmt::format("U+{:04X}", static_cast<std::uint32_t>(cp));
}

}  // namespace

std::optional<TextProblem> text_problem(std::string_view text) {
  for (std::size_t i = 0; i < text.size();) {
    const Decoded d = decode(text, i);
    if (d.error != nullptr) {
      std::string detail = bytes_of(text, i, d.length);
      if (*d.error != '\0') detail += fmt::format(", {}", d.error);
      if (d.error == kSurrogate) detail += fmt::format(" ({})", code_point_name(d.code_point));
      return TextProblem{TextFault::not_utf8, i + 1, detail};
    }
    if (is_control(d.code_point)) {
      std::string detail = code_point_name(d.code_point);
      if (const char* name = control_name(d.code_point)) detail += fmt::format(", {}", name);
      return TextProblem{TextFault::control, i + 1, detail};
    }
    i += d.length;
  }
  return std::nullopt;
}

std::optional<TextProblem> name_problem(std::string_view name) {
  if (auto problem = text_problem(name)) return problem;
  // Valid UTF-8 from here on: every character decodes.
  std::size_t first = name.size();  // byte of the first character that is not white space
  std::size_t end = 0;              // end of the last one
  std::size_t last_space = 0;       // start of the white space that ends the name
  for (std::size_t i = 0; i < name.size();) {
    const Decoded d = decode(name, i);
    if (!is_white_space(d.code_point)) {
      if (first == name.size()) first = i;
      end = i + d.length;
    } else if (end == i) {
      last_space = i;
    }
    i += d.length;
  }
  if (first == name.size()) return TextProblem{TextFault::blank, 0, ""};
  if (first > 0)
    return TextProblem{TextFault::outer_space, 1, code_point_name(decode(name, 0).code_point)};
  if (end < name.size())
    return TextProblem{TextFault::outer_space, last_space + 1,
                       code_point_name(decode(name, last_space).code_point)};
  return std::nullopt;
}

std::string describe_text_problem(const TextProblem& p) {
  switch (p.fault) {
    case TextFault::not_utf8:
      return fmt::format("byte {} is not valid UTF-8 ({})", p.byte, p.detail);
    case TextFault::control:
      return fmt::format("byte {} is a control character ({})", p.byte, p.detail);
    case TextFault::blank: return "the name is blank";
    case TextFault::outer_space:
      return fmt::format("the name {} with white space ({} at byte {})",
                         p.byte == 1 ? "begins" : "ends", p.detail, p.byte);
  }
  return "the text cannot be stored";
}

const char* text_problem_fix(TextFault fault) {
  switch (fault) {
    case TextFault::not_utf8: return "write the text in UTF-8";
    case TextFault::control:
      return "leave out control characters, tabs and line breaks: the text must fit on one line";
    case TextFault::blank: return "give a name with at least one visible character";
    case TextFault::outer_space: return "remove the white space around the name";
  }
  return "";
}

std::string printable_text(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size();) {
    const Decoded d = decode(text, i);
    if (d.error != nullptr) {
      for (std::size_t k = 0; k < d.length; ++k)
        out += fmt::format("\\x{:02x}", static_cast<unsigned char>(text[i + k]));
    } else if (d.code_point == '\n') {
      out += "\\n";
    } else if (d.code_point == '\r') {
      out += "\\r";
    } else if (d.code_point == '\t') {
      out += "\\t";
    } else if (d.code_point < 0x20 || d.code_point == 0x7F) {
      out += fmt::format("\\x{:02x}", static_cast<unsigned>(d.code_point));
    } else if (is_control(d.code_point)) {
      out += fmt::format("\\u{:04x}", static_cast<std::uint32_t>(d.code_point));
    } else {
      out += text.substr(i, d.length);
    }
    i += d.length;
  }
  return out;
}

}  // namespace alphatrail::core
