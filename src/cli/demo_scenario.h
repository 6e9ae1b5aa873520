// The demo scenario: invented data for a fictional firm, Brindle Hollow Capital, whose
// systematic strategies are judged against a fictional market index (the Alder Vale
// Composite) and a fictional bill curve. Reproducible from a seed; for the demo only.
#pragma once

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

namespace alphatrail::cli {

struct DemoFile {
  std::filesystem::path path;
  std::string kind;  // ingest kind
  std::string name;  // set/curve/benchmark name ("" for a strategy file)
  bool percent = false;
  bool levels = false;
  std::string note;
};

// Writes the scenario's CSV files into `folder` and returns them in ingest order.
std::vector<DemoFile> write_demo_files(const std::filesystem::path& folder, std::uint64_t seed);

// Writes the index restated for one month (October 2008 dividends, +0.8 points) and
// returns the file: the revision the demo re-runs its evaluations after.
DemoFile write_restated_benchmark(const std::filesystem::path& folder);

// Names used by the demo's evaluations.
inline constexpr const char* kDemoBenchmark = "alder-vale-composite";
inline constexpr const char* kDemoRate = "alder-vale-bills";
inline constexpr const char* kDemoFactors = "brindle-styles";
inline constexpr const char* kDemoStudy = "trend-lookbacks";

}  // namespace alphatrail::cli
