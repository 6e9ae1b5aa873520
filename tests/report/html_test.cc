// The HTML page writer: escaping and structure.
#include "report/html.h"

#include <gtest/gtest.h>

#include "report/svg.h"

namespace alphatrail::report {
namespace {

bool contains(const std::string& text, const std::string& part) {
  return text.find(part) != std::string::npos;
}

TEST(Html, EscapesEveryPieceOfText) {
  Page page;
  page.title = "Run <1> & 'co'";
  page.facts.items = {{"note", "\"quoted\""}};
  page.sections = {{"S & T", {Paragraph{"x < y", false}, BulletList{{"<li>"}}}}};
  const std::string html = render_page(page);
  EXPECT_TRUE(contains(html, "<title>Run &lt;1&gt; &amp; &apos;co&apos;</title>"));
  EXPECT_TRUE(contains(html, "<dd>&quot;quoted&quot;</dd>"));
  EXPECT_TRUE(contains(html, "<h2>S &amp; T</h2>"));
  EXPECT_TRUE(contains(html, "<p>x &lt; y</p>"));
  EXPECT_TRUE(contains(html, "<li>&lt;li&gt;</li>"));
}

TEST(Html, LaysOutSectionsInOrderWithChartsTablesAndCautions) {
  Page page;
  page.title = "T";
  page.sections = {
      {"First", {Figure{"<svg class=\"chart\"></svg>", "caption & units"}}},
      {"Second",
       {HtmlTable{{"term", "estimate"}, {{"alpha", "0.001"}}, {false, true}, "Coefficients", false},
        Paragraph{"not investment advice", true}}}};
  page.footer = "made by";
  const std::string html = render_page(page);
  EXPECT_EQ(html.rfind("<!DOCTYPE html>", 0), 0u);
  EXPECT_TRUE(contains(html, "<meta charset=\"utf-8\">"));
  EXPECT_LT(html.find("<h2>First</h2>"), html.find("<h2>Second</h2>"));
  // Chart SVG goes in as it is; its caption is escaped.
  EXPECT_TRUE(contains(html,
                       "<figure>\n<svg class=\"chart\"></svg><figcaption>caption &amp; "
                       "units</figcaption>"));
  EXPECT_TRUE(contains(html, "<th>term</th><th class=\"num\">estimate</th>"));
  EXPECT_TRUE(contains(html, "<td>alpha</td><td class=\"num\">0.001</td>"));
  EXPECT_TRUE(contains(html, "<p class=\"caution\">not investment advice</p>"));
  EXPECT_TRUE(contains(html, "<footer>made by</footer>"));
  // Self-contained and printable: no script, print rules present.
  EXPECT_FALSE(contains(html, "<script"));
  EXPECT_TRUE(contains(html, "@media print"));
  EXPECT_TRUE(contains(html, "break-inside: avoid"));
}

}  // namespace
}  // namespace alphatrail::report
