// Tests of the stored-text rules: valid UTF-8 of every length passes, every class of ill-formed
// sequence (RFC 3629, Unicode table 3-7 of well-formed byte sequences) and every control
// character is refused at the offset of its first byte, and names are refused blank or with
// white space around them.
#include "core/text.h"

#include <fmt/format.h>
#include <gtest/gtest.h>

#include <initializer_list>
#include <string>
#include <utility>

namespace alphatrail::core {
namespace {

// "FAULT at BYTE: DETAIL" of the first problem, or "ok".
std::string problem_of(std::string_view text, bool as_name = false) {
  const auto p = as_name ? name_problem(text) : text_problem(text);
  if (!p) return "ok";
  const char* fault = p->fault == TextFault::not_utf8  ? "not_utf8"
                      : p->fault == TextFault::control ? "control"
                      : p->fault == TextFault::blank   ? "blank"
                                                       : "outer_space";
  return std::string(fault) + " at " + std::to_string(p->byte) + ": " + p->detail;
}

std::string name_problem_of(std::string_view name) {
  return problem_of(name, true);
}

TEST(Text, AcceptsUtf8OfEveryLength) {
  for (const char* text : {
           "", "trend-12m",
           "caf\xc3\xa9-strat",         // U+00E9, two bytes
           "\xc2\xa1",                  // U+00A1, the first two-byte character after C1
           "\xdf\xbf",                  // U+07FF, the last two-byte character
           "\xe0\xa0\x80",              // U+0800, the first three-byte character
           "\xe6\x97\xa5\xe6\x9c\xac",  // two CJK characters
           "\xed\x9f\xbf",              // U+D7FF, just below the surrogates
           "\xee\x80\x80",              // U+E000, just above them
           "\xef\xbf\xbd",              // U+FFFD
           "\xf0\x90\x80\x80",          // U+10000, the first four-byte character
           "\xf0\x9f\x93\x88 up",       // U+1F4C8
           "\xf4\x8f\xbf\xbf",          // U+10FFFF, the last code point
           "a\xc2\xa0"
           "b",       // a no-break space inside
           "~ !\"#",  // printable ASCII
       })
    EXPECT_EQ(problem_of(text), "ok") << text;
}

TEST(Text, RefusesEachClassOfIllFormedUtf8AtItsFirstByte) {
  // Latin-1: the e9 of "café" is a lead byte without its continuation.
  EXPECT_EQ(problem_of("caf\xe9-strat"), "not_utf8 at 4: 0xe9");
  EXPECT_EQ(problem_of("caf\xe9"), "not_utf8 at 4: 0xe9");
  EXPECT_EQ(problem_of("ab\x80"
                       "c"),
            "not_utf8 at 3: 0x80, a continuation byte without a lead byte");
  EXPECT_EQ(problem_of("\xbf"), "not_utf8 at 1: 0xbf, a continuation byte without a lead byte");
  // Sequences cut short.
  EXPECT_EQ(problem_of("x\xe2\x82"), "not_utf8 at 2: 0xe2 0x82, cut short");
  EXPECT_EQ(problem_of("\xe2\x82y"), "not_utf8 at 1: 0xe2 0x82, cut short");
  EXPECT_EQ(problem_of("\xf0\x9f\x93"), "not_utf8 at 1: 0xf0 0x9f 0x93, cut short");
  // Overlong encodings of '/' (U+002F) and of U+07FF, U+FFFF.
  EXPECT_EQ(problem_of("\xc0\xaf"), "not_utf8 at 1: 0xc0 0xaf, an overlong encoding");
  EXPECT_EQ(problem_of("a\xc1\xbf"), "not_utf8 at 2: 0xc1 0xbf, an overlong encoding");
  EXPECT_EQ(problem_of("\xe0\x80\xaf"), "not_utf8 at 1: 0xe0 0x80 0xaf, an overlong encoding");
  EXPECT_EQ(problem_of("\xe0\x9f\xbf"), "not_utf8 at 1: 0xe0 0x9f 0xbf, an overlong encoding");
  EXPECT_EQ(problem_of("\xf0\x8f\xbf\xbf"),
            "not_utf8 at 1: 0xf0 0x8f 0xbf 0xbf, an overlong encoding");
  // UTF-16 surrogates encoded as UTF-8 (CESU-8).
  EXPECT_EQ(problem_of("x\xed\xa0\x80"), "not_utf8 at 2: 0xed 0xa0 0x80, a surrogate (U+D800)");
  EXPECT_EQ(problem_of("\xed\xbf\xbf"), "not_utf8 at 1: 0xed 0xbf 0xbf, a surrogate (U+DFFF)");
  // Above U+10FFFF, and bytes UTF-8 never uses.
  EXPECT_EQ(problem_of("\xf4\x90\x80\x80"), "not_utf8 at 1: 0xf4 0x90 0x80 0x80, above U+10FFFF");
  EXPECT_EQ(problem_of("\xf5\x80\x80\x80"), "not_utf8 at 1: 0xf5 0x80 0x80 0x80, above U+10FFFF");
  EXPECT_EQ(problem_of("ok\xff"), "not_utf8 at 3: 0xff, never used in UTF-8");
  EXPECT_EQ(problem_of("\xf8\x88\x80\x80\x80"), "not_utf8 at 1: 0xf8, never used in UTF-8");
}

// A first problem as its kind and 1-based byte: {0, 0} for none, {1, N} for ill-formed UTF-8
// at byte N, {2, N} for a control character there.
using Found = std::pair<int, std::size_t>;

// The first problem by a second, independent reading: the well-formed byte sequences of
// Unicode table 3-7 written out range by range, and the controls by their encodings.
Found reference_problem(std::string_view s) {
  struct Range {
    unsigned char low, high;
  };
  static constexpr Range kAny{0x80, 0xBF};
  const auto at = [&](std::size_t i) { return static_cast<unsigned char>(s[i]); };
  for (std::size_t i = 0; i < s.size();) {
    const unsigned char b = at(i);
    Range rest[3];
    std::size_t n = 0;  // continuation bytes
    if (b <= 0x7F) {
      if (b < 0x20 || b == 0x7F) return {2, i + 1};
    } else if (b >= 0xC2 && b <= 0xDF) {
      rest[n++] = kAny;
    } else if (b == 0xE0) {
      rest[n++] = {0xA0, 0xBF}, rest[n++] = kAny;
    } else if ((b >= 0xE1 && b <= 0xEC) || b == 0xEE || b == 0xEF) {
      rest[n++] = kAny, rest[n++] = kAny;
    } else if (b == 0xED) {
      rest[n++] = {0x80, 0x9F}, rest[n++] = kAny;
    } else if (b == 0xF0) {
      rest[n++] = {0x90, 0xBF}, rest[n++] = kAny, rest[n++] = kAny;
    } else if (b >= 0xF1 && b <= 0xF3) {
      rest[n++] = kAny, rest[n++] = kAny, rest[n++] = kAny;
    } else if (b == 0xF4) {
      rest[n++] = {0x80, 0x8F}, rest[n++] = kAny, rest[n++] = kAny;
    } else {
      return {1, i + 1};
    }
    for (std::size_t k = 0; k < n; ++k)
      if (i + 1 + k >= s.size() || at(i + 1 + k) < rest[k].low || at(i + 1 + k) > rest[k].high)
        return {1, i + 1};
    const bool c1 = b == 0xC2 && at(i + 1) <= 0x9F;
    const bool separator =
        b == 0xE2 && at(i + 1) == 0x80 && (at(i + 2) == 0xA8 || at(i + 2) == 0xA9);
    if (c1 || separator) return {2, i + 1};
    i += 1 + n;
  }
  return {0, 0};
}

Found first_problem(std::string_view s) {
  const auto p = text_problem(s);
  if (!p) return {0, 0};
  return {p->fault == TextFault::not_utf8 ? 1 : 2, p->byte};
}

TEST(Text, AgreesWithTheTableOfWellFormedSequencesOnEveryShortText) {
  // Every text of one and two bytes, of three bytes starting with a byte above 0x7f (8.4
  // million), and four-byte texts with each lead byte from 0xe0, each second byte and
  // boundary values as the last two.
  std::size_t checked = 0;
  const auto check = [&](std::initializer_list<int> bytes) {
    std::string s;
    for (const int b : bytes) s += static_cast<char>(b);
    ++checked;
    const Found want = reference_problem(s);
    const Found got = first_problem(s);
    if (got == want) return true;
    std::string shown;
    for (const int b : bytes) shown += fmt::format(" {:02x}", b);
    ADD_FAILURE() << "bytes" << shown << ": got " << got.first << " at " << got.second
                  << ", the table says " << want.first << " at " << want.second;
    return false;
  };
  for (int a = 0; a < 256; ++a) {
    if (!check({a})) return;
    for (int b = 0; b < 256; ++b) {
      if (!check({a, b})) return;
      // An ASCII byte followed by two is a two-byte text one byte later: checked above.
      for (int c = 0; c < 256 && a >= 0x80; ++c)
        if (!check({a, b, c})) return;
    }
  }
  const int edges[] = {0x00, 0x41, 0x7F, 0x80, 0x8F, 0x90, 0x9F, 0xA0, 0xBF, 0xC0, 0xFF};
  for (int a = 0xE0; a < 256; ++a)
    for (int b = 0; b < 256; ++b)
      for (const int c : edges)
        for (const int d : edges)
          if (!check({a, b, c, d})) return;
  EXPECT_EQ(checked, 256u + 65536u + 128u * 65536u + 32u * 256u * 121u);
}

TEST(Text, RefusesControlCharactersAtTheirFirstByte) {
  EXPECT_EQ(problem_of("a\tb"), "control at 2: U+0009, a tab");
  EXPECT_EQ(problem_of("a\nb"), "control at 2: U+000A, a line break");
  EXPECT_EQ(problem_of("ab\r"), "control at 3: U+000D, a carriage return");
  EXPECT_EQ(problem_of(std::string_view("\0x", 2)), "control at 1: U+0000");
  EXPECT_EQ(problem_of("\x01"), "control at 1: U+0001");
  EXPECT_EQ(problem_of("x\x1f"), "control at 2: U+001F");
  EXPECT_EQ(problem_of("del\x7f"), "control at 4: U+007F, delete");
  EXPECT_EQ(problem_of("\xc2\x80"), "control at 1: U+0080");
  EXPECT_EQ(problem_of("caf\xc3\xa9\xc2\x85"), "control at 6: U+0085");  // after a 2-byte é
  EXPECT_EQ(problem_of("\xc2\x9f"), "control at 1: U+009F");
  EXPECT_EQ(problem_of("a\xe2\x80\xa8"
                       "b"),
            "control at 2: U+2028, a line separator");
  EXPECT_EQ(problem_of("a\xe2\x80\xa9"), "control at 2: U+2029, a paragraph separator");
}

TEST(Text, ReportsTheFirstProblem) {
  EXPECT_EQ(problem_of("\xc3\xa9\x01\xe9"), "control at 3: U+0001");
  EXPECT_EQ(problem_of("\xc3\xa9\xe9\x01"), "not_utf8 at 3: 0xe9");
}

TEST(Text, NamesAreNotBlankNorSurroundedByWhiteSpace) {
  EXPECT_EQ(name_problem_of("caf\xc3\xa9-strat"), "ok");
  EXPECT_EQ(name_problem_of("trend 12m"), "ok");  // inner spaces are part of the name
  EXPECT_EQ(name_problem_of(""), "blank at 0: ");
  EXPECT_EQ(name_problem_of("   "), "blank at 0: ");
  EXPECT_EQ(name_problem_of("\xc2\xa0\xe3\x80\x80"), "blank at 0: ");
  EXPECT_EQ(name_problem_of(" a"), "outer_space at 1: U+0020");
  EXPECT_EQ(name_problem_of("ab "), "outer_space at 3: U+0020");
  EXPECT_EQ(name_problem_of("\xc2\xa0"
                            "a"),
            "outer_space at 1: U+00A0");
  EXPECT_EQ(name_problem_of("a\xe2\x80\xaf"), "outer_space at 2: U+202F");
  EXPECT_EQ(name_problem_of("a\xe3\x80\x80"), "outer_space at 2: U+3000");
  // Text problems come first: a tab is a control character, not white space.
  EXPECT_EQ(name_problem_of("\t"), "control at 1: U+0009, a tab");
  EXPECT_EQ(name_problem_of(" \xe9"), "not_utf8 at 2: 0xe9");
}

TEST(Text, DescribesProblemsAndTheirFixes) {
  EXPECT_EQ(describe_text_problem(*text_problem("revis\xe9")), "byte 6 is not valid UTF-8 (0xe9)");
  EXPECT_EQ(describe_text_problem(*text_problem("a\tb")),
            "byte 2 is a control character (U+0009, a tab)");
  EXPECT_EQ(describe_text_problem(*name_problem("  ")), "the name is blank");
  EXPECT_EQ(describe_text_problem(*name_problem(" a")),
            "the name begins with white space (U+0020 at byte 1)");
  EXPECT_EQ(describe_text_problem(*name_problem("a ")),
            "the name ends with white space (U+0020 at byte 2)");
  EXPECT_EQ(std::string(text_problem_fix(TextFault::not_utf8)), "write the text in UTF-8");
  EXPECT_EQ(std::string(text_problem_fix(TextFault::control)),
            "leave out control characters, tabs and line breaks: the text must fit on one line");
  EXPECT_EQ(std::string(text_problem_fix(TextFault::blank)),
            "give a name with at least one visible character");
  EXPECT_EQ(std::string(text_problem_fix(TextFault::outer_space)),
            "remove the white space around the name");
}

TEST(Text, PrintsTextOnOneLine) {
  EXPECT_EQ(printable_text("a\tb\xe9"), "a\\tb\\xe9");
  EXPECT_EQ(printable_text("x\ny\r"), "x\\ny\\r");
  EXPECT_EQ(printable_text("\x01\x7f"), "\\x01\\x7f");
  EXPECT_EQ(printable_text("caf\xc3\xa9"), "caf\xc3\xa9");
  EXPECT_EQ(printable_text("x\xc2\x85y\xe2\x80\xa8"), "x\\u0085y\\u2028");
  EXPECT_EQ(printable_text("\xed\xa0\x80!"), "\\xed\\xa0\\x80!");
}

}  // namespace
}  // namespace alphatrail::core
