#include "cli/demo_scenario.h"

#include <fmt/format.h>

#include <cmath>
#include <fstream>
#include <random>

#include "core/dates.h"

namespace alphatrail::cli {

namespace {

// A normal draw by Box-Muller from a fixed engine, so the data are the same on every
// platform (std::normal_distribution is implementation-defined).
class Draws {
 public:
  explicit Draws(std::uint64_t seed) : engine_(seed) {}
  double uniform() { return (static_cast<double>(engine_() >> 11) + 0.5) * 0x1.0p-53; }
  double normal() {
    const double u = uniform();
    const double v = uniform();
    return std::sqrt(-2.0 * std::log(u)) * std::cos(2.0 * M_PI * v);
  }

 private:
  std::mt19937_64 engine_;
};

// The last weekday of a month: where month-end index and bill observations fall.
core::Day last_business_day(int year, int month) {
  core::Day d = core::to_day({year, month, core::days_in_month(year, month)});
  while (core::weekday(d) >= 5) --d;
  return d;
}

struct StrategySpec {
  const char* name;
  double alpha;  // per month, decimal
  double beta;
  double size;   // loading on the size spread
  double value;  // loading on the value spread
  double noise;  // residual sd per month
};

// Invented strategies: three trend look-backs (one study), a carry book, a defensive
// tilt and a hedging overlay that runs against the market.
constexpr StrategySpec kStrategies[] = {
    {"trend-12m", 0.0035, 0.55, 0.10, -0.05, 0.012},
    {"trend-6m", 0.0012, 0.65, 0.05, 0.00, 0.018},
    {"trend-3m", -0.0004, 0.75, 0.00, 0.05, 0.025},
    {"carry-g10", 0.0018, 0.25, 0.00, 0.10, 0.015},
    {"defensive-tilt", 0.0006, 0.60, -0.20, 0.30, 0.010},
    {"crash-hedge", -0.0010, -0.35, 0.00, 0.00, 0.012},
};

constexpr int kFirstYear = 2000;
constexpr int kYears = 25;

}  // namespace

std::vector<DemoFile> write_demo_files(const std::filesystem::path& folder, std::uint64_t seed) {
  std::filesystem::create_directories(folder);
  Draws draw(seed);
  const int months = kYears * 12;

  std::ofstream index(folder / "alder-vale-composite.csv");
  std::ofstream bills(folder / "alder-vale-bills.csv");
  std::ofstream styles(folder / "brindle-styles.csv");
  std::ofstream funds(folder / "brindle-hollow-strategies.csv");
  index << "date,level\n";
  bills << "date,1M,3M\n";
  styles << "month,size-spread,value-spread\n";
  funds << "month";
  for (const auto& s : kStrategies) funds << ',' << s.name;
  funds << '\n';

  double level = 1000.0;
  double yield = 2.40;  // 1-month bill, annualized percent
  // The month before the sample opens carries the first index level and bill yield.
  index << fmt::format("{},{:.2f}\n", core::format_date(last_business_day(kFirstYear - 1, 12)),
                       level);
  bills << fmt::format("{},{:.3f},{:.3f}\n",
                       core::format_date(last_business_day(kFirstYear - 1, 12)), yield,
                       yield + 0.15);
  for (int m = 0; m < months; ++m) {
    const int year = kFirstYear + m / 12;
    const int month = m % 12 + 1;
    const double rf = std::pow(1.0 + yield / 100.0, 1.0 / 12.0) - 1.0;  // known at the start
    const double market_excess = 0.0055 + 0.045 * draw.normal();
    const double size = 0.0015 + 0.025 * draw.normal();
    const double value = 0.0010 + 0.028 * draw.normal();
    level *= 1.0 + rf + market_excess;
    index << fmt::format("{},{:.2f}\n", core::format_date(last_business_day(year, month)), level);

    funds << fmt::format("{:04}-{:02}", year, month);
    for (const auto& s : kStrategies) {
      const double r = rf + s.alpha + s.beta * market_excess + s.size * size + s.value * value +
                       s.noise * draw.normal();
      funds << fmt::format(",{:.4f}", 100.0 * r);  // the back-tester exports percent
    }
    funds << '\n';
    styles << fmt::format("{:04}-{:02},{:.6f},{:.6f}\n", year, month, size, value);

    yield = std::clamp(yield + 0.12 * draw.normal(), 0.02, 6.5);
    bills << fmt::format("{},{:.3f},{:.3f}\n", core::format_date(last_business_day(year, month)),
                         yield, yield + 0.15 + 0.05 * draw.normal());
  }

  return {
      {folder / "alder-vale-composite.csv", "benchmark", kDemoBenchmark, false, true,
       "Alder Vale Composite total-return index, month-end levels (invented)"},
      {folder / "alder-vale-bills.csv", "rate", kDemoRate, false, false,
       "Alder Vale bill yields, annualized percent, month-end (invented)"},
      {folder / "brindle-styles.csv", "factor", kDemoFactors, false, false,
       "Brindle Hollow style spreads, monthly decimal returns (invented)"},
      {folder / "brindle-hollow-strategies.csv", "strategy", "", true, false,
       "Brindle Hollow back-test export, monthly percent returns (invented)"},
  };
}

DemoFile write_restated_benchmark(const std::filesystem::path& folder) {
  std::ifstream in(folder / "alder-vale-composite.csv");
  const auto path = folder / "alder-vale-composite-restated.csv";
  std::ofstream out(path);
  std::string line;
  std::getline(in, line);
  out << line << '\n';
  const core::CivilDate restated{2008, 10, 1};
  while (std::getline(in, line)) {
    const auto comma = line.find(',');
    const std::string date = line.substr(0, comma);
    double level = std::stod(line.substr(comma + 1));
    // The October 2008 close was misprinted 0.8% low; only that level changes, so the
    // restatement moves two returns, October's and November's.
    const core::CivilDate c = core::to_civil(core::parse_date(date).day);
    const bool restate = c.year == restated.year && c.month == restated.month;
    if (restate) level *= 1.008;
    out << (restate ? fmt::format("{},{:.2f}\n", date, level) : line + "\n");
  }
  return {path,  "benchmark", kDemoBenchmark,
          false, true,        "restated: October 2008 close corrected (invented)"};
}

}  // namespace alphatrail::cli
