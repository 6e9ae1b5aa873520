// Writes the benchmark's input files: a wide CSV of daily strategy returns (one column per
// strategy), a benchmark, a bill curve and a two-factor set, all over the same business days.
//   bench_make_data FOLDER [STRATEGIES] [DAYS]
#include <fmt/format.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <random>
#include <string>
#include <vector>

#include "core/dates.h"

namespace {

using alphatrail::core::Day;

struct Writer {
  explicit Writer(const std::filesystem::path& path) : file(std::fopen(path.c_str(), "wb")) {}
  ~Writer() { std::fclose(file); }
  void put(const std::string& text) { std::fwrite(text.data(), 1, text.size(), file); }
  std::FILE* file;
};

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    std::fprintf(stderr, "usage: bench_make_data FOLDER [STRATEGIES] [DAYS]\n");
    return 2;
  }
  const std::filesystem::path folder = argv[1];
  const int strategies = argc > 2 ? std::stoi(argv[2]) : 1000;
  const int days = argc > 3 ? std::stoi(argv[3]) : 5000;
  std::filesystem::create_directories(folder);

  std::vector<Day> dates;
  for (Day d = alphatrail::core::to_day({2006, 1, 2}); static_cast<int>(dates.size()) < days; ++d)
    if (alphatrail::core::weekday(d) < 5) dates.push_back(d);

  std::mt19937_64 engine(7);
  std::normal_distribution<double> normal(0.0, 1.0);
  std::vector<double> market(days), size(days), value(days), yield(days);
  double y = 2.0;
  for (int t = 0; t < days; ++t) {
    market[t] = 0.0003 + 0.011 * normal(engine);
    size[t] = 0.0001 + 0.005 * normal(engine);
    value[t] = 0.0001 + 0.006 * normal(engine);
    y = std::clamp(y + 0.01 * normal(engine), 0.05, 6.0);
    yield[t] = y;
  }

  Writer bench(folder / "benchmark.csv");
  Writer rate(folder / "rate.csv");
  Writer factors(folder / "factors.csv");
  bench.put("date,bench-index\n");
  rate.put("date,1M\n");
  factors.put("date,size-spread,value-spread\n");
  for (int t = 0; t < days; ++t) {
    const std::string date = alphatrail::core::format_date(dates[t]);
    const double rf = std::pow(1 + yield[t] / 100, 1.0 / 252) - 1;
    bench.put(fmt::format("{},{:.8f}\n", date, rf + market[t]));
    rate.put(fmt::format("{},{:.3f}\n", date, yield[t]));
    factors.put(fmt::format("{},{:.8f},{:.8f}\n", date, size[t], value[t]));
  }

  std::vector<double> alpha(strategies), beta(strategies), bs(strategies), bv(strategies);
  for (int s = 0; s < strategies; ++s) {
    alpha[s] = 0.0001 * normal(engine);
    beta[s] = 0.3 + 0.9 * std::abs(normal(engine));
    bs[s] = 0.3 * normal(engine);
    bv[s] = 0.3 * normal(engine);
  }
  Writer wide(folder / "strategies.csv");
  std::string line = "date";
  for (int s = 0; s < strategies; ++s) line += fmt::format(",variant-{:04}", s);
  wide.put(line + "\n");
  for (int t = 0; t < days; ++t) {
    line = alphatrail::core::format_date(dates[t]);
    const double rf = std::pow(1 + yield[t] / 100, 1.0 / 252) - 1;
    for (int s = 0; s < strategies; ++s) {
      const double r = rf + alpha[s] + beta[s] * market[t] + bs[s] * size[t] + bv[s] * value[t] +
                       0.006 * normal(engine);
      fmt::format_to(std::back_inserter(line), ",{:.8f}", r);
    }
    wide.put(line + "\n");
  }
  return 0;
}
