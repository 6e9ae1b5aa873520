// The store is the only layer that knows SQLite: no file under src/ outside src/store/ may
// include an SQLite header (SQLiteCpp, sqlite3.h) or hold SQL text, i.e. a string literal that
// starts with an upper-case SQL keyword ("SELECT ", "PRAGMA ", "BEGIN", ...). Comments and help
// text that mention SQL in words are fine. The scan reads the source tree when the test runs
// and names every offence as file:line.
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <array>
#include <cctype>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

namespace {

namespace fs = std::filesystem;

constexpr std::array<std::string_view, 15> kSqlStarts{
    "SELECT ", "INSERT ", "UPDATE ", "DELETE ",  "CREATE ",   "PRAGMA ",  "BEGIN", "COMMIT",
    "WITH ",   "DROP ",   "ALTER ",  "ROLLBACK", "SAVEPOINT", "RELEASE ", "VACUUM"};

bool is_sql(std::string_view literal) {
  for (const std::string_view start : kSqlStarts)
    if (literal.substr(0, start.size()) == start) return true;
  return false;
}

// Returns "line: why" for every SQLite include and SQL string literal in C++ source text.
// Comments, character literals and raw strings are lexed so that neither hides nor fakes one.
std::vector<std::string> offences(const std::string& text) {
  std::vector<std::string> found;
  int line = 1;
  bool line_start = true;  // only white space so far on this line
  std::size_t i = 0;
  const auto advance_to = [&](std::size_t end) {
    for (; i < end && i < text.size(); ++i)
      if (text[i] == '\n') ++line;
  };
  while (i < text.size()) {
    const char c = text[i];
    if (c == '\n') {
      ++line;
      ++i;
      line_start = true;
      continue;
    }
    if (line_start && c == '#') {
      const std::size_t end = text.find('\n', i);
      const std::string_view directive(text.data() + i,
                                       (end == std::string::npos ? text.size() : end) - i);
      if (directive.find("include") != std::string_view::npos &&
          (directive.find("SQLiteCpp") != std::string_view::npos ||
           directive.find("sqlite3.h") != std::string_view::npos))
        found.push_back(std::to_string(line) + ": SQLite include " + std::string(directive));
      i = end == std::string::npos ? text.size() : end;
      continue;
    }
    if (std::isspace(static_cast<unsigned char>(c)) == 0) line_start = false;
    if (text.compare(i, 2, "//") == 0) {
      const std::size_t end = text.find('\n', i);
      i = end == std::string::npos ? text.size() : end;
    } else if (text.compare(i, 2, "/*") == 0) {
      const std::size_t end = text.find("*/", i + 2);
      advance_to(end == std::string::npos ? text.size() : end + 2);
    } else if (c == '\'') {
      // A digit separator (1'000) follows a digit; anything else starts a character literal.
      if (i > 0 && std::isalnum(static_cast<unsigned char>(text[i - 1])) != 0) {
        ++i;
        continue;
      }
      std::size_t j = i + 1;
      while (j < text.size() && text[j] != '\'' && text[j] != '\n') j += text[j] == '\\' ? 2 : 1;
      advance_to(j + 1);
    } else if (c == '"') {
      const int at = line;
      std::string literal;
      if (i > 0 && text[i - 1] == 'R') {  // R"delim( ... )delim"
        const std::size_t open = text.find('(', i);
        // fmt::format, not ")" + ... + "\"": GCC 12 warns falsely on that (-Wrestrict).
        const std::string close = fmt::format("){}\"", text.substr(i + 1, open - i - 1));
        const std::size_t end = text.find(close, open);
        literal = text.substr(open + 1, end - open - 1);
        advance_to(end == std::string::npos ? text.size() : end + close.size());
      } else {
        std::size_t j = i + 1;
        while (j < text.size() && text[j] != '"' && text[j] != '\n') {
          if (text[j] == '\\' && j + 1 < text.size()) ++j;
          literal += text[j];
          ++j;
        }
        advance_to(j + 1);
      }
      if (is_sql(literal)) found.push_back(std::to_string(at) + ": SQL text \"" + literal + "\"");
    } else {
      ++i;
    }
  }
  return found;
}

TEST(Layering, ScannerFindsIncludesAndSqlLiteralsOnly) {
  const std::string source =
      "#include <sqlite3.h>\n"
      "#include <SQLiteCpp/Database.h>\n"
      "#include <string>\n"
      "// \"SELECT in a comment\"\n"
      "/* \"DELETE in a block\" */\n"
      "const char* help = \"Run one SQL statement: SELECT or WITH\";\n"
      "char q = '\"'; int n = 1'000;\n"
      "auto a = \"SELECT 1\";\n"
      "auto b = R\"x(PRAGMA user_version)x\";\n"
      "auto c = \"select lower case is words\";\n"
      "db.exec(\"BEGIN IMMEDIATE\");\n";
  const std::vector<std::string> expected{
      "1: SQLite include #include <sqlite3.h>", "2: SQLite include #include <SQLiteCpp/Database.h>",
      "8: SQL text \"SELECT 1\"", "9: SQL text \"PRAGMA user_version\"",
      "11: SQL text \"BEGIN IMMEDIATE\""};
  EXPECT_EQ(offences(source), expected);
}

TEST(Layering, NoSqliteOutsideTheStore) {
  const fs::path src = fs::path(ALPHATRAIL_SOURCE_DIR) / "src";
  const fs::path store = src / "store";
  ASSERT_TRUE(fs::is_directory(store)) << store;
  std::vector<std::string> found;
  int scanned = 0;
  for (const auto& entry : fs::recursive_directory_iterator(src)) {
    if (!entry.is_regular_file()) continue;
    const fs::path relative = entry.path().lexically_relative(src);
    if (*relative.begin() == "store") continue;
    const std::string ext = entry.path().extension().string();
    if (ext != ".cc" && ext != ".h" && ext != ".cpp" && ext != ".hpp" && ext != ".in") continue;
    std::ifstream in(entry.path(), std::ios::binary);
    std::ostringstream text;
    text << in.rdbuf();
    ++scanned;
    for (const std::string& offence : offences(text.str()))
      found.push_back("src/" + relative.generic_string() + ":" + offence);
  }
  EXPECT_GT(scanned, 10) << "found too few sources under " << src;
  std::string report;
  for (const std::string& f : found) report += f + "\n";
  EXPECT_TRUE(found.empty()) << "SQLite belongs in src/store/ only; found outside it:\n" << report;
}

}  // namespace
