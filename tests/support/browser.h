// Opens an HTML file in headless Chromium and reports what a test needs to know about it: did
// it load, what went wrong, what it fetched, and the size and mark count of every chart.
//
// Each call starts its own Chromium (/usr/bin/chromium, or $ALPHATRAIL_CHROMIUM) with a fresh
// profile in a scratch folder, removed afterwards, and kills its whole process group after
// 60 s, so a hung browser fails the test instead of hanging CI. Requests to other hosts go to
// a proxy that refuses them at once: a page never touches the network, its external
// references show up as failed requests. The file under test is never modified: probe_page
// serves its folder over loopback HTTP (Chromium counts no fetches of file: URLs) with the
// page replaced by a copy that carries an injected probe script; real report pages carry no
// scripts of their own. Screenshots are taken of the file itself.
// Harness failures (Chromium missing, crashing or timing out, no PNG written) throw
// std::runtime_error; faults of the page are reported in PageProbe.
#pragma once

#include <filesystem>
#include <string>
#include <utility>
#include <vector>

namespace alphatrail::testing {

// One <svg data-chart="KIND"> as laid out by the browser.
struct ChartProbe {
  std::string kind;  // the data-chart attribute
  double width = 0;  // getBoundingClientRect(), CSS pixels
  double height = 0;
  int marks = 0;            // elements with class "mark" inside the svg
  int declared_marks = -1;  // the data-marks attribute; -1 when absent or not a whole number
};

struct PageProbe {
  bool loaded = false;              // the probe ran after the load event
  std::vector<std::string> errors;  // script errors, failed resources, console.error calls
  int external_requests = 0;        // distinct URLs fetched or tried, data: and blob: aside
  std::vector<ChartProbe> charts;   // every svg[data-chart] in document order
  std::string title;
};

// Returns true when Chromium exists and answers --version (checked once per process).
bool browser_available();

// Loads the page in a window of width x height CSS pixels and probes it after the load event,
// e.g. probe_page(dir / "report.html").charts.size(). Relative references resolve against the
// page's own folder, as they would for the original.
PageProbe probe_page(const std::filesystem::path& html, int width = 1200, int height = 3000);

// Writes a PNG of the page as shown in a window of width x height pixels (device scale 1, no
// scroll bars), replacing png.
void save_screenshot(const std::filesystem::path& html, const std::filesystem::path& png,
                     int width = 1200, int height = 3000);

// Returns the {width, height} in the IHDR chunk of a PNG file; throws when it is not a PNG.
std::pair<int, int> png_size(const std::filesystem::path& png);

}  // namespace alphatrail::testing
