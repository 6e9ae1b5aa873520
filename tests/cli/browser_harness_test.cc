// Tests of the headless-browser harness (tests/support/browser.h) on small pages written here:
// chart sizes and mark counts, script and console errors, external requests, the title, and
// screenshots. They skip on a machine without Chromium; CI installs it (scripts/install-deps
// --test), so there they always run.
#include <gtest/gtest.h>

#include <filesystem>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "support/browser.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::browser_available;
using alphatrail::testing::contains;
using alphatrail::testing::PageProbe;
using alphatrail::testing::png_size;
using alphatrail::testing::probe_page;
using alphatrail::testing::save_screenshot;
using alphatrail::testing::ScratchDir;

class BrowserHarness : public ::testing::Test {
 protected:
  void SetUp() override {
    if (!browser_available()) {
      GTEST_SKIP() << "no Chromium at /usr/bin/chromium or $ALPHATRAIL_CHROMIUM "
                      "(scripts/install-deps --test installs it)";
    }
  }

  // Returns true when one of the probe's errors holds part.
  static bool has_error(const PageProbe& probe, const std::string& part) {
    for (const auto& e : probe.errors) {
      if (contains(e, part)) return true;
    }
    return false;
  }

  ScratchDir dir;
};

// Two charts, one sized by attributes and one by CSS, with an svg that is not a chart and a
// .mark outside every chart: neither may be counted.
constexpr const char* kTwoCharts = R"(<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Two charts</title>
<style>body { margin: 0; } .wide { width: 400px; height: 250px; display: block; }</style>
</head><body>
<svg data-chart="line" data-marks="3" width="320" height="180" viewBox="0 0 320 180">
  <circle class="mark" cx="10" cy="10" r="2"/><circle class="mark" cx="20" cy="20" r="2"/>
  <g><circle class="mark" cx="30" cy="30" r="2"/></g><path d="M0 0 L10 10"/>
</svg>
<svg width="50" height="50"><rect class="mark" width="5" height="5"/></svg>
<svg data-chart="bars" class="wide" viewBox="0 0 100 100">
  <rect class="mark" width="5" height="5"/><rect class="mark" width="5" height="5"/>
  <rect class="mark" width="5" height="5"/><rect class="mark" width="5" height="5"/>
  <rect class="mark axis" width="5" height="5"/><rect class="axis" width="5" height="5"/>
</svg>
<p class="mark">not in a chart</p>
</body></html>
)";

TEST_F(BrowserHarness, MeasuresEveryChartInDocumentOrder) {
  const PageProbe probe = probe_page(dir.write("charts.html", kTwoCharts));
  ASSERT_TRUE(probe.loaded);
  EXPECT_TRUE(probe.errors.empty()) << probe.errors.front();
  EXPECT_EQ(probe.external_requests, 0);
  EXPECT_EQ(probe.title, "Two charts");
  ASSERT_EQ(probe.charts.size(), 2u);
  EXPECT_EQ(probe.charts[0].kind, "line");
  EXPECT_DOUBLE_EQ(probe.charts[0].width, 320);
  EXPECT_DOUBLE_EQ(probe.charts[0].height, 180);
  EXPECT_EQ(probe.charts[0].marks, 3);
  EXPECT_EQ(probe.charts[0].declared_marks, 3);
  EXPECT_EQ(probe.charts[1].kind, "bars");
  EXPECT_DOUBLE_EQ(probe.charts[1].width, 400);
  EXPECT_DOUBLE_EQ(probe.charts[1].height, 250);
  EXPECT_EQ(probe.charts[1].marks, 5);
  EXPECT_EQ(probe.charts[1].declared_marks, -1);  // no data-marks attribute
}

// The page under test is measured through a copy; the original must stay byte for byte.
TEST_F(BrowserHarness, LeavesThePageUnchanged) {
  const fs::path page = dir.write("charts.html", kTwoCharts);
  probe_page(page);
  EXPECT_EQ(alphatrail::testing::read_file(page), kTwoCharts);
}

TEST_F(BrowserHarness, ReportsScriptAndConsoleErrors) {
  const PageProbe probe = probe_page(dir.write("broken.html", R"(<!doctype html>
<html><head><title>Broken</title></head><body>
<script>console.error("the axis has no scale");</script>
<script>undefinedChartFunction();</script>
</body></html>
)"));
  ASSERT_TRUE(probe.loaded);
  ASSERT_EQ(probe.errors.size(), 2u);
  EXPECT_TRUE(has_error(probe, "console.error: the axis has no scale"));
  EXPECT_TRUE(has_error(probe, "undefinedChartFunction"));
  EXPECT_TRUE(has_error(probe, "script error"));
}

// 192.0.2.1 is TEST-NET-1 (RFC 5737), never a real host; the harness refuses it anyway.
TEST_F(BrowserHarness, CountsAndReportsAnExternalRequest) {
  const PageProbe probe = probe_page(dir.write("external.html", R"(<!doctype html>
<html><head><title>External</title></head><body><img src="http://192.0.2.1/x.png" alt="">
</body></html>
)"));
  ASSERT_TRUE(probe.loaded);
  EXPECT_EQ(probe.external_requests, 1);
  EXPECT_TRUE(has_error(probe, "failed to load <img> http://192.0.2.1/x.png"));
}

// Relative references resolve next to the original, as when a person opens the file, and a
// fetched local file counts as a request (a self-contained page has none); data: URLs do not.
TEST_F(BrowserHarness, ResolvesRelativeReferencesNextToTheOriginal) {
  dir.write("style.css", "svg { width: 210px; height: 70px; }");
  const PageProbe probe = probe_page(dir.write("linked.html", R"(<!doctype html>
<html><head><link rel="stylesheet" href="style.css"></head><body>
<img alt="" src="data:image/gif;base64,R0lGODlhAQABAAAAACwAAAAAAQABAAACAkQBADs=">
<svg data-chart="area"></svg>
</body></html>
)"));
  ASSERT_TRUE(probe.loaded);
  EXPECT_TRUE(probe.errors.empty()) << probe.errors.front();
  EXPECT_EQ(probe.external_requests, 1);
  ASSERT_EQ(probe.charts.size(), 1u);
  EXPECT_DOUBLE_EQ(probe.charts[0].width, 210);
  EXPECT_DOUBLE_EQ(probe.charts[0].height, 70);
}

// A relative reference to a missing file and a file: URL (which a page served over HTTP may
// not load) are both errors: the page would not show the same anywhere else.
TEST_F(BrowserHarness, ReportsMissingAndLocalFiles) {
  const PageProbe probe = probe_page(dir.write("missing.html", R"(<!doctype html>
<html><head><title>Missing</title></head><body>
<img alt="" src="charts/missing.png"><img alt="" src="file:///etc/hostname.png">
</body></html>
)"));
  ASSERT_TRUE(probe.loaded);
  EXPECT_EQ(probe.external_requests, 2);  // both are tried
  ASSERT_EQ(probe.errors.size(), 2u);
  EXPECT_TRUE(has_error(probe, "failed to load <img> http://127.0.0.1:"));
  EXPECT_TRUE(has_error(probe, "/charts/missing.png"));
  EXPECT_TRUE(has_error(probe, "failed to load <img> file:///etc/hostname.png"));
}

// The probe's JSON passes through the serialized DOM: markup characters and non-ASCII text
// must come back exactly. A bare fragment (no <html>, no <head>) is probed as well.
TEST_F(BrowserHarness, ReadsTitlesWithMarkupAndNonAsciiCharacters) {
  const PageProbe probe = probe_page(
      dir.write("fragment.html",
                "<title>Brindle &amp; Hollow &lt;draft&gt; \"Q3\" \xE2\x80\x94 5\xC2\xA0%</title>"
                "<svg data-chart=\"dot\" data-marks=\"many\" width=\"10\" height=\"20\"></svg>"));
  ASSERT_TRUE(probe.loaded);
  EXPECT_EQ(probe.title, "Brindle & Hollow <draft> \"Q3\" \xE2\x80\x94 5\xC2\xA0%");
  ASSERT_EQ(probe.charts.size(), 1u);
  EXPECT_EQ(probe.charts[0].kind, "dot");
  EXPECT_EQ(probe.charts[0].declared_marks, -1);  // not a whole number
  EXPECT_DOUBLE_EQ(probe.charts[0].height, 20);
}

TEST_F(BrowserHarness, ScreenshotIsAPngOfTheRequestedSize) {
  const fs::path page = dir.write("charts.html", kTwoCharts);
  const fs::path png = dir / "shot.png";
  save_screenshot(page, png, 800, 600);
  EXPECT_EQ(png_size(png), std::make_pair(800, 600));
  save_screenshot(page, png);  // replaces it, at the default size
  EXPECT_EQ(png_size(png), std::make_pair(1200, 3000));
}

TEST(BrowserPng, RejectsAFileThatIsNotAPng) {
  const ScratchDir dir;
  EXPECT_THROW(png_size(dir.write("fake.png", "GIF89a not a png at all......")),
               std::runtime_error);
  EXPECT_THROW(png_size(dir / "missing.png"), std::runtime_error);
}

}  // namespace
