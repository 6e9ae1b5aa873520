#include "report/svg.h"

#include <gtest/gtest.h>

#include <cmath>

namespace alphatrail::report {
namespace {

TEST(Escape, EscapesTheFiveXmlSpecialCharacters) {
  EXPECT_EQ(escape("a<b & 'c' > \"d\""), "a&lt;b &amp; &apos;c&apos; &gt; &quot;d&quot;");
  EXPECT_EQ(escape("&amp;"), "&amp;amp;");  // escaping is not idempotent: escape once
  EXPECT_EQ(escape("Brindle Hollow 2004-06 (12%)"), "Brindle Hollow 2004-06 (12%)");
  EXPECT_EQ(escape(""), "");
}

TEST(Number, AtMostTwoDecimalsAndNoTrailingZeros) {
  EXPECT_EQ(number(12.346), "12.35");
  EXPECT_EQ(number(3.0), "3");
  EXPECT_EQ(number(2.5), "2.5");
  EXPECT_EQ(number(0.1 + 0.2), "0.3");
  EXPECT_EQ(number(-1.5), "-1.5");
  EXPECT_EQ(number(1e6), "1000000");
  EXPECT_EQ(number(640.0), "640");
}

TEST(Number, NeverMinusZeroNorNonFinite) {
  EXPECT_EQ(number(-0.0), "0");
  EXPECT_EQ(number(-0.001), "0");
  EXPECT_EQ(number(-0.004), "0");
  EXPECT_EQ(number(-0.006), "-0.01");
  EXPECT_EQ(number(NAN), "0");
  EXPECT_EQ(number(INFINITY), "0");
}

TEST(PathData, LinesAndClosedShapes) {
  EXPECT_EQ(path_data({{0, 1}, {2.5, 3.333}}), "M0 1L2.5 3.33");
  EXPECT_EQ(path_data({{0, 0}, {10, 0}, {10, 5}}, true), "M0 0L10 0L10 5Z");
  EXPECT_EQ(path_data({{4, 5}}), "M4 5L4 5");  // zero length: drawn as a dot with round caps
  EXPECT_EQ(path_data({}), "");
}

TEST(SvgWriter, NestsElementsAndClosesWhatIsOpen) {
  SvgWriter w;
  w.open("svg", "viewBox", "0 0 10 10").open("g", "class", "axis").leaf("circle", "r", 2.5);
  w.close().text("text", "hi", "x", 1.0);
  EXPECT_EQ(w.finish(),
            "<svg viewBox=\"0 0 10 10\">\n<g class=\"axis\">\n<circle r=\"2.5\"/>\n</g>\n"
            "<text x=\"1\">hi</text>\n</svg>\n");
}

TEST(SvgWriter, EscapesAttributeValuesAndText) {
  SvgWriter w;
  w.text("text", "alpha > 0 & \"robust\"", "data-label", "run <7> 'rev'");
  EXPECT_EQ(w.finish(),
            "<text data-label=\"run &lt;7&gt; &apos;rev&apos;\">alpha &gt; 0 &amp; "
            "&quot;robust&quot;</text>\n");
}

TEST(SvgWriter, WritesNumbersThroughNumber) {
  SvgWriter w;
  w.leaf("line", "x1", -0.0001, "y1", 12.0, "x2", 3, "y2", 1.005e2);
  EXPECT_EQ(w.finish(), "<line x1=\"0\" y1=\"12\" x2=\"3\" y2=\"100.5\"/>\n");
}

}  // namespace
}  // namespace alphatrail::report
