// The rules every text the ledger stores must meet: series, set, curve and column names, notes
// and study names. Checked where the text enters (a CSV header, a command-line option), so that
// nothing stored can break the JSON output or a table line later.
//
// Text: well-formed UTF-8 (RFC 3629: no overlong forms, no surrogates U+D800..U+DFFF, nothing
// above U+10FFFF, no stray or missing continuation bytes) without control characters: C0
// U+0000..U+001F (tab and line breaks included), DEL U+007F, C1 U+0080..U+009F and the line and
// paragraph separators U+2028, U+2029. A name is text that is not blank and neither begins nor
// ends with white space (U+0020, U+00A0, U+1680, U+2000..U+200A, U+202F, U+205F, U+3000).
//
// Pure computation; nothing throws. Each check returns the first problem, or nullopt.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>

namespace alphatrail::core {

enum class TextFault {
  not_utf8,     // an ill-formed byte sequence
  control,      // a control character or a line or paragraph separator
  blank,        // names only: empty or nothing but white space
  outer_space,  // names only: white space at the start or the end
};

struct TextProblem {
  TextFault fault = TextFault::not_utf8;
  std::size_t byte = 0;  // 1-based position of the first offending byte; 0 for a blank name
  std::string detail;    // the bytes or the character, e.g. "0xe9" or "U+0009, a tab"
};

// Returns the first problem of a text to be stored, or nullopt when it may be stored.
// Example: text_problem("caf\xe9-strat")->byte == 4 and ->detail == "0xe9"
std::optional<TextProblem> text_problem(std::string_view text);

// Returns the first problem of a name: a text problem, a blank name, or white space at its
// start or end; nullopt when it may be stored.
// Example: name_problem("   ")->fault == TextFault::blank
std::optional<TextProblem> name_problem(std::string_view name);

// Describes a problem in words, without the fix.
// Example: "byte 4 is not valid UTF-8 (0xe9)", "byte 3 is a control character (U+0009, a tab)",
//          "the name is blank", "the name begins with white space (U+0020 at byte 1)"
std::string describe_text_problem(const TextProblem& problem);

// Returns the fix of a problem of text typed on the command line.
// Example: text_problem_fix(TextFault::not_utf8) == std::string("write the text in UTF-8")
const char* text_problem_fix(TextFault fault);

// Returns the text as it can be quoted on one line of a message: ill-formed bytes and C0
// controls and DEL as \xNN (\n, \r and \t as such), C1 controls and U+2028, U+2029 as \uNNNN.
// Example: printable_text("a\tb\xe9") == "a\\tb\\xe9"
std::string printable_text(std::string_view text);

}  // namespace alphatrail::core
