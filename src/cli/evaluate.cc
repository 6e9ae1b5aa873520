#include "cli/evaluate.h"

#include <fmt/format.h>
#include <fnmatch.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <map>
#include <set>

#include "core/error.h"
#include "core/evaluation.h"
#include "core/number_text.h"
#include "core/parallel.h"
#include "core/reading.h"
#include "core/timings.h"
#include "record/run_parameters.h"
#include "record/stored_result.h"
#include "report/reports.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

using nlohmann::ordered_json;

Error usage(const std::string& message) {
  return Error(Failure::invalid_argument, message);
}

bool is_pattern(const std::string& s) {
  return s.find_first_of("*?[") != std::string::npos;
}

std::vector<std::string> resolve_strategies(store::Ledger& ledger,
                                            const std::vector<std::string>& requested) {
  const auto all = ledger.series_names(core::SeriesKind::strategy);
  std::vector<std::string> chosen;
  std::set<std::string> seen;
  for (const auto& want : requested) {
    bool matched = false;
    for (const auto& name : all)
      if (is_pattern(want) ? fnmatch(want.c_str(), name.c_str(), 0) == 0 : name == want) {
        matched = true;
        if (seen.insert(name).second) chosen.push_back(name);
      }
    if (!matched)
      throw Error(
          Failure::not_found,
          is_pattern(want)
              ? fmt::format("no strategy matches '{}'; `alphatrail series` lists them", want)
              : fmt::format("no strategy named '{}'; `alphatrail series` lists them", want));
  }
  return chosen;
}

std::optional<int> pinned(const EvaluateRequest& rq, const std::string& name) {
  const auto it = rq.pinned_versions.find(name);
  if (it == rq.pinned_versions.end()) return std::nullopt;
  return it->second;
}

store::LoadedVersion load_kind(store::Ledger& ledger, const EvaluateRequest& rq,
                               const std::string& name, const std::vector<std::string>& kinds,
                               const std::string& role) {
  auto loaded = ledger.load_version(name, pinned(rq, name));
  if (std::find(kinds.begin(), kinds.end(), loaded.info.kind) == kinds.end())
    throw usage(fmt::format("'{}' is a {} series, not a {}; name a {} series with --{}", name,
                            loaded.info.kind, role, kinds.front(), role));
  return loaded;
}

core::ReturnInput to_return_input(std::string name, record::ColumnData&& column,
                                  const store::VersionInfo& info) {
  core::ReturnInput in;
  in.name = std::move(name);
  in.data.dates = std::move(column.dates);
  in.data.values = std::move(column.values);
  if (info.frequency) in.frequency = core::parse_frequency(*info.frequency);
  return in;
}

std::optional<core::Day> parse_bound(const std::string& text, const char* option, bool is_start) {
  if (text.empty()) return std::nullopt;
  const auto d = core::parse_date(text);
  if (d.status != core::DateParse::ok)
    throw usage(fmt::format("{} {}: not a date; write YYYY-MM-DD or YYYY-MM", option, text));
  if (d.month_only && is_start) {
    const auto c = core::to_civil(d.day);
    return core::to_day({c.year, c.month, 1});
  }
  return d.day;
}

struct FactorChoice {
  store::LoadedVersion version;
  std::vector<std::string> columns;
};

// Everything a group of strategies at one frequency shares.
struct Plan {
  core::Frequency frequency;
  std::string tenor;
  bool tenor_given;
  std::string parameters_json;       // canonical: sorted keys, every default written out
  std::vector<std::size_t> members;  // indices into the strategy list
  int rolling_window = 0;            // N periods; 0: none
};

void draw_progress(std::size_t done, std::size_t total) {
  constexpr int kWidth = 30;
  const int filled = static_cast<int>(kWidth * done / std::max<std::size_t>(total, 1));
  std::cerr << fmt::format("\r[{}{}] {}/{} runs recorded", std::string(filled, '#'),
                           std::string(kWidth - filled, ' '), done, total)
            << (done == total ? "\n" : "") << std::flush;
}

}  // namespace

namespace {

// Receives a request's evaluated runs chunk by chunk, in run order, with the number of
// strategies in all. It runs on the thread that owns the connection while the workers
// evaluate the next chunk.
using RunSink = std::function<void(std::vector<PendingRun>& chunk, std::size_t total)>;

// Evaluates every strategy the request names, handing the runs to `sink` as they are ready
// until a strategy fails; then goes on only to name every failure, and throws. Must run inside
// a transaction, so that every input comes from one snapshot.
void evaluate_in_snapshot(store::Ledger& ledger, const EvaluateRequest& rq, const RunSink& sink) {
  core::mark_phase("evaluate: start");
  core::EvaluationSettings settings;
  settings.covariance.kind = rq.errors;
  if (rq.lags) {
    if (*rq.lags < 0)
      throw usage(
          fmt::format("--lags {}: write a whole number of lags (0 or more) or auto", *rq.lags));
    settings.covariance.lags = *rq.lags;
    if (settings.covariance.kind != core::ErrorKind::newey_west)
      throw usage("--lags applies to --errors newey-west only");
  }
  settings.covariance.small_sample = rq.small_sample;
  if (settings.covariance.small_sample && settings.covariance.kind != core::ErrorKind::newey_west)
    throw usage(
        "--small-sample applies to Newey-West errors (HC1 is HC0 with the factor; "
        "classic, HC0 and HC3 never take it)");
  settings.confidence = rq.confidence;
  settings.rate_basis = rq.rate_basis;
  settings.rate_timing = rq.rate_timing;
  settings.annualize = rq.annualize;
  settings.from = parse_bound(rq.from, "--from", true);
  settings.to = parse_bound(rq.to, "--to", false);
  if (settings.from && settings.to && *settings.to < *settings.from)
    throw usage("--to comes before --from; swap them");
  if (rq.rolling.mode == RollingChoice::Mode::periods && rq.rolling.periods <= 0)
    throw usage(
        fmt::format("--rolling {}: write a whole number of periods per window, auto "
                    "(three years of periods) or off",
                    rq.rolling.periods));

  const auto strategy_names = resolve_strategies(ledger, rq.strategies);
  auto benchmark = load_kind(ledger, rq, rq.benchmark, {"benchmark", "strategy"}, "benchmark");
  const std::string& rate_name = rq.rate;
  const std::string& rate_tenor = rq.rate_tenor;
  auto rate = load_kind(ledger, rq, rate_name, {"rate"}, "rate");
  if (!rate_tenor.empty() && std::find(rate.info.columns.begin(), rate.info.columns.end(),
                                       rate_tenor) == rate.info.columns.end())
    throw usage(fmt::format("rate curve '{}' has no tenor {}; it has {}", rate_name, rate_tenor,
                            fmt::join(rate.info.columns, ", ")));

  std::vector<FactorChoice> factors;
  std::set<std::string> factor_terms;
  for (const auto& spec : rq.factors) {
    const std::string& set_name = spec.set;
    FactorChoice choice{load_kind(ledger, rq, set_name, {"factor"}, "factor"), spec.columns};
    if (choice.columns.empty()) choice.columns = choice.version.info.columns;
    for (const auto& c : choice.columns) {
      if (std::find(choice.version.info.columns.begin(), choice.version.info.columns.end(), c) ==
          choice.version.info.columns.end())
        throw usage(fmt::format("factor set '{}' has no column '{}'; it has {}", set_name, c,
                                fmt::join(choice.version.info.columns, ", ")));
      if (!factor_terms.insert(c).second)
        throw usage(fmt::format("factor '{}' is named twice; name each factor once", c));
    }
    factors.push_back(std::move(choice));
  }

  // Strategies and the frequency each is evaluated at.
  std::vector<store::VersionRequest> wanted;
  wanted.reserve(strategy_names.size());
  for (const auto& name : strategy_names) wanted.push_back({name, pinned(rq, name)});
  // The version rows now (the frequencies decide the plans); the observations chunk by chunk
  // while evaluating, below.
  const std::vector<store::VersionInfo> strategies = ledger.find_versions(wanted);
  core::mark_phase("evaluate: inputs found");

  const auto detected = [](const store::VersionInfo& info, const std::string& what) {
    if (!info.frequency)
      throw Error(Failure::bad_input,
                  fmt::format("cannot tell the frequency of {} '{}' from its dates; re-ingest it "
                              "with regular dates",
                              what, info.name));
    return *core::parse_frequency(*info.frequency);
  };
  std::vector<core::Frequency> shared_frequencies{detected(benchmark.info, "benchmark")};
  for (const auto& f : factors)
    shared_frequencies.push_back(detected(f.version.info, "factor set"));

  std::map<core::Frequency, Plan> plans;
  for (std::size_t i = 0; i < strategies.size(); ++i) {
    core::Frequency f;
    if (rq.frequency) {
      f = *rq.frequency;
    } else {
      auto all = shared_frequencies;
      all.push_back(detected(strategies[i], "strategy"));
      f = core::lowest_frequency(all);
    }
    auto [it, fresh] = plans.try_emplace(f, Plan{f, "", false, {}, {}});
    it->second.members.push_back(i);
  }

  for (auto& [f, plan] : plans) {
    plan.tenor_given = !rate_tenor.empty();
    plan.tenor = plan.tenor_given ? rate_tenor : core::choose_tenor(rate.info.columns, f).label;
    plan.rolling_window = rq.rolling.mode == RollingChoice::Mode::automatic
                              ? core::default_rolling_window(f)
                          : rq.rolling.mode == RollingChoice::Mode::periods ? rq.rolling.periods
                                                                            : 0;
    if (plan.rolling_window > 0) {
      const auto problem = core::rolling_window_problem(
          plan.rolling_window, static_cast<int>(2 + factor_terms.size()), settings.covariance);
      if (!problem.empty())
        throw usage(fmt::format("--rolling {}: {} ({} data)", rq.rolling.text(), problem,
                                core::frequency_name(f)));
    }
    record::RunParameters parameters;
    parameters.frequency = f;
    parameters.frequency_rule =
        rq.frequency ? record::FrequencyRule::given : record::FrequencyRule::lowest_among_inputs;
    parameters.from = settings.from;
    parameters.to = settings.to;
    parameters.errors = settings.covariance.kind;
    parameters.lags = rq.lags;
    parameters.small_sample = settings.covariance.small_sample;
    parameters.confidence = settings.confidence;
    parameters.rate_basis = settings.rate_basis;
    parameters.rate_timing = settings.rate_timing;
    parameters.rate_tenor = plan.tenor;
    parameters.tenor_rule =
        plan.tenor_given ? record::TenorRule::given : record::TenorRule::closest_to_period_length;
    parameters.annualize = settings.annualize;
    for (const auto& fc : factors) parameters.factors.push_back({fc.version.info.name, fc.columns});
    if (plan.rolling_window > 0) parameters.rolling_window = plan.rolling_window;
    plan.parameters_json = record::parameters_text(parameters);
  }

  std::string factor_label;
  for (const auto& fc : factors)
    factor_label += fmt::format("{}{}:{}", factor_label.empty() ? "" : "; ", fc.version.info.name,
                                fmt::join(fc.columns, ","));
  const auto input_of = [](const std::string& role, int position, const store::VersionInfo& info,
                           std::vector<std::string> columns) {
    return record::RunInput{role,         position,          info.version_id,   info.name,
                            info.version, info.content_hash, std::move(columns)};
  };
  const auto pending_run = [&](const Plan& plan, const store::VersionInfo& strategy,
                               core::EvaluationResult&& result) {
    PendingRun p;
    p.result = std::move(result);
    p.settings = settings;
    p.settings.rolling_window = plan.rolling_window;
    record::NewRun& run = p.run;
    run.strategy = strategy.name;
    run.benchmark = benchmark.info.name;
    run.rate = fmt::format("{}:{}", rate.info.name, plan.tenor);
    run.factors = factor_label;
    run.study = rq.study;
    run.note = rq.note;
    run.revises_run_id = rq.revises_run_id;
    run.parameters_json = plan.parameters_json;
    run.inputs.push_back(input_of("strategy", 1, strategy, {strategy.name}));
    run.inputs.push_back(
        input_of("benchmark", 1, benchmark.info, {benchmark.info.columns.front()}));
    run.inputs.push_back(input_of("rate", 1, rate.info, {plan.tenor}));
    int position = 1;
    for (const auto& fc : factors)
      run.inputs.push_back(input_of("factor", position++, fc.version.info, fc.columns));
    return p;
  };

  // Evaluate each frequency group against its shared inputs.
  std::vector<std::string> failures;
  std::vector<PendingRun> ready;  // evaluated, not yet handed to the sink
  for (const auto& [f, entry] : plans) {
    const Plan& plan = entry;  // named: lambdas capture it
    core::SharedInputs shared;
    shared.benchmark = to_return_input(
        benchmark.info.name, record::ColumnData(benchmark.columns.front()), benchmark.info);
    const auto tenor_it = std::find(rate.info.columns.begin(), rate.info.columns.end(), plan.tenor);
    auto tenor_column =
        rate.columns[static_cast<std::size_t>(tenor_it - rate.info.columns.begin())];
    shared.rate.name = rate.info.name;
    shared.rate.tenor = plan.tenor;
    shared.rate.yields = {std::move(tenor_column.dates), std::move(tenor_column.values)};
    shared.rate.unit =
        rate.info.unit == "percent yield" ? core::RateUnit::percent : core::RateUnit::decimal;
    shared.rate.quote = rate.info.quote == std::optional<std::string>("discount")
                            ? core::RateQuote::discount
                            : core::RateQuote::yield;
    for (const auto& fc : factors)
      for (const auto& col : fc.columns) {
        const auto it =
            std::find(fc.version.info.columns.begin(), fc.version.info.columns.end(), col);
        shared.factors.push_back(to_return_input(
            col,
            record::ColumnData(
                fc.version.columns[static_cast<std::size_t>(it - fc.version.info.columns.begin())]),
            fc.version.info));
      }
    core::EvaluationSettings plan_settings = settings;
    plan_settings.rolling_window = plan.rolling_window;
    const core::Evaluator evaluator(shared, f, plan_settings);

    // The strategies' observations are read a chunk at a time, each chunk while the workers
    // evaluate the one before: reading is SQLite's and serial (on this thread, which owns the
    // connection), evaluating is parallel, and the two overlap. The first chunk is small, so
    // that the workers start early.
    const std::size_t count = plan.members.size();
    const auto chunk_end = [count](std::size_t first) {
      return std::min(count, first == 0 ? std::size_t{32} : first + 128);
    };
    const auto load_chunk = [&](std::size_t first) {
      std::vector<store::VersionInfo> chunk;
      for (std::size_t j = first; j < chunk_end(first); ++j)
        chunk.push_back(strategies[plan.members[j]]);
      return ledger.load_observations(std::move(chunk));
    };
    std::vector<store::LoadedVersion> loaded = load_chunk(0);
    for (std::size_t first = 0; first < count; first = chunk_end(first)) {
      std::vector<core::ReturnInput> inputs;
      inputs.reserve(loaded.size());
      for (auto& version : loaded)
        inputs.push_back(
            to_return_input(version.info.name, std::move(version.columns.front()), version.info));
      std::vector<core::Evaluator::Outcome> outcomes;
      std::vector<store::LoadedVersion> next;
      // This thread reads the next chunk and hands the last one's runs to the sink (which may
      // write them) while the workers evaluate this chunk.
      const auto evaluate = [&] { outcomes = evaluator.evaluate_many(inputs, 0, rq.keep_series); };
      const bool more = chunk_end(first) < count;
      if (!more && ready.empty()) {
        evaluate();
      } else {
        core::run_parallel(2, [&](std::size_t task) {
          if (task == 1) return evaluate();
          if (more) next = load_chunk(chunk_end(first));
          if (!ready.empty()) sink(ready, strategies.size());
          ready.clear();
        });
      }
      for (std::size_t j = 0; j < inputs.size(); ++j) {
        if (!outcomes[j].result)
          failures.push_back(fmt::format("{}: {}", inputs[j].name, outcomes[j].error));
        else if (failures.empty())  // after a failure nothing is recorded: only name the rest
          ready.push_back(pending_run(plan, strategies[plan.members[first + j]],
                                      std::move(*outcomes[j].result)));
      }
      loaded = std::move(next);
    }
  }
  if (!ready.empty()) sink(ready, strategies.size());
  if (!failures.empty())
    throw Error(Failure::cannot_estimate,
                fmt::format("{} of {} strategies cannot be evaluated, so no run was recorded "
                            "(evaluate the others without them):\n  {}",
                            failures.size(), strategies.size(), fmt::join(failures, "\n  ")));
}

}  // namespace

std::vector<PendingRun> evaluate_request(store::Ledger& ledger, const EvaluateRequest& rq) {
  std::vector<PendingRun> pending;
  ledger.read_transaction([&] {
    evaluate_in_snapshot(ledger, rq, [&](std::vector<PendingRun>& chunk, std::size_t total) {
      pending.reserve(total);
      for (auto& p : chunk) pending.push_back(std::move(p));
    });
  });
  return pending;
}

namespace {

// Records evaluated runs inside the caller's write transaction; on_stored(n) follows the
// n-th run stored. Each run is one more trial of its study and of its strategy, counted from
// what the ledger holds (this transaction's runs included).
std::vector<std::int64_t> record_in_transaction(store::Ledger& ledger,
                                                std::vector<PendingRun>& pending,
                                                const std::function<void(std::size_t)>& on_stored) {
  std::vector<core::ReadingContext> contexts;
  contexts.reserve(pending.size());
  std::map<std::string, int> study_runs;
  std::map<std::string, int> strategy_runs;
  const auto counted = [&](std::map<std::string, int>& counts, const std::string& name,
                           int (store::Ledger::*count)(const std::string&)) {
    auto [it, fresh] = counts.try_emplace(name, 0);
    if (fresh) it->second = (ledger.*count)(name);
    return ++it->second;
  };
  for (const auto& p : pending) {
    const int study = p.run.study.empty()
                          ? 0
                          : counted(study_runs, p.run.study, &store::Ledger::count_study_runs);
    contexts.push_back(
        {p.run.study, study,
         counted(strategy_runs, p.run.strategy, &store::Ledger::count_strategy_runs)});
  }
  core::parallel_ranges(pending.size(), core::worker_count(pending.size(), 16),
                        [&](std::size_t first, std::size_t last) {
                          for (std::size_t i = first; i < last; ++i) {
                            PendingRun& p = pending[i];
                            p.run.reading =
                                core::compose_reading(p.result, p.settings, contexts[i]);
                            p.run.result = &p.result;
                          }
                        });
  std::vector<const record::NewRun*> runs;
  runs.reserve(pending.size());
  for (const auto& p : pending) runs.push_back(&p.run);
  return ledger.store_runs(runs, on_stored);
}

}  // namespace

std::vector<std::int64_t> record_runs(store::Ledger& ledger, std::vector<PendingRun>& pending,
                                      bool progress) {
  std::vector<std::int64_t> run_ids;
  std::function<void(std::size_t)> on_stored;
  if (progress && pending.size() > 1)
    on_stored = [&](std::size_t done) { draw_progress(done, pending.size()); };
  ledger.write_transaction([&] { run_ids = record_in_transaction(ledger, pending, on_stored); });
  return run_ids;
}

std::vector<std::int64_t> evaluate_and_record(store::Ledger& ledger, const EvaluateRequest& rq,
                                              bool progress) {
  // One write transaction: the inputs come from one snapshot, each chunk of runs is written
  // while the next is evaluated, and a failure anywhere records nothing.
  std::vector<std::int64_t> run_ids;
  ledger.write_transaction([&] {
    evaluate_in_snapshot(ledger, rq, [&](std::vector<PendingRun>& chunk, std::size_t total) {
      const std::size_t before = run_ids.size();
      std::function<void(std::size_t)> on_stored;
      if (progress && total > 1)
        on_stored = [&](std::size_t done) { draw_progress(before + done, total); };
      const auto ids = record_in_transaction(ledger, chunk, on_stored);
      run_ids.insert(run_ids.end(), ids.begin(), ids.end());
    });
  });
  core::mark_phase("evaluate: recorded");
  return run_ids;
}

namespace {

double num(const ordered_json& j) {
  return j.is_number() ? j.get<double>() : NAN;
}

std::string fixed(const ordered_json& j, int digits) {
  return core::fixed(num(j), digits);
}

std::string pct(const ordered_json& j, int digits = 2) {
  return core::signed_percent(num(j), digits);
}

std::string p_text(const ordered_json& j) {
  return core::p_value_text(num(j));
}

const char* per(const std::string& frequency) {
  if (frequency == "daily") return "per day";
  if (frequency == "weekly") return "per week";
  if (frequency == "quarterly") return "per quarter";
  return "per month";
}

// Prints the short rolling section of a run: how many windows, over which ends, and the range
// of alpha a year and beta; the windows themselves are one `show --format csv` away.
void print_rolling_text(std::ostream& out, const ordered_json& run) {
  const auto& rolling = run["rolling"];
  const std::string frequency = run["sample"]["frequency"];
  const auto window = rolling["window"].get<int>();
  const auto& windows = rolling["windows"];
  const std::string noun = std::string(per(frequency)).substr(4);  // "per month" -> "month"
  if (windows.empty()) {
    out << fmt::format(
        "  rolling estimates      none: the sample is shorter than the window of {} {}s\n\n",
        window, noun);
    return;
  }
  double alpha_low = NAN, alpha_high = NAN, beta_low = NAN, beta_high = NAN;
  int missing = 0;
  for (const auto& w : windows) {
    const double a = num(w["alpha_annualized"]);
    const double b = num(w["beta"]);
    if (std::isnan(a) || std::isnan(b)) {
      ++missing;
      continue;
    }
    alpha_low = std::isnan(alpha_low) ? a : std::min(alpha_low, a);
    alpha_high = std::isnan(alpha_high) ? a : std::max(alpha_high, a);
    beta_low = std::isnan(beta_low) ? b : std::min(beta_low, b);
    beta_high = std::isnan(beta_high) ? b : std::max(beta_high, b);
  }
  const std::string errors = rolling["errors"];
  const int lags = windows.front()["lags"].get<int>();
  out << fmt::format("  rolling estimates      {} windows of {} {}s, ending {} to {}\n",
                     windows.size(), window, noun, windows.front()["end"].get<std::string>(),
                     windows.back()["end"].get<std::string>());
  out << fmt::format("                         {} errors{}\n", errors,
                     errors != "newey-west" ? ""
                     : rolling["lag_rule"] == "auto"
                         ? fmt::format(", {} lags in each window "
                                       "(the automatic rule for {})",
                                       lags, window)
                         : fmt::format(", {} lags in each window", lags));
  if (missing < static_cast<int>(windows.size()))
    out << fmt::format(
        "                         alpha {} to {} a year ({}), beta {:.2f} to {:.2f}{}\n",
        pct(alpha_low), pct(alpha_high), rolling["annualize"].get<std::string>(), beta_low,
        beta_high, missing > 0 ? fmt::format("; {} windows without figures", missing) : "");
  else
    out << "                         no window could be estimated (see the warnings)\n";
  out << fmt::format(
      "                         one row per window: `alphatrail show {} --format csv`\n\n",
      run["run_id"].get<std::int64_t>());
}

}  // namespace

void print_run_text(std::ostream& out, const ordered_json& run) {
  const auto& sample = run["sample"];
  const auto& stats = run["statistics"];
  const std::string frequency = sample["frequency"];
  const std::string unit = per(frequency);
  const auto& params = run["parameters"];
  out << fmt::format("Run {}: {} against {}\n", run["run_id"].get<std::int64_t>(),
                     run["strategy"].get<std::string>(), run["benchmark"].get<std::string>());
  out << fmt::format("  recorded {} (UTC), engine {}, inputs hash {}\n",
                     run["created_at"].get<std::string>(), run["engine_version"].get<std::string>(),
                     run["inputs_hash"].get<std::string>());
  if (run["study"].is_string()) out << fmt::format("  study {}\n", run["study"].get<std::string>());
  if (run["revises_run_id"].is_number())
    out << fmt::format("  revises run {}\n", run["revises_run_id"].get<std::int64_t>());
  out << fmt::format("  risk-free {}, {} basis, yield known at the period's {}\n",
                     run["rate"].get<std::string>(), params["rate_basis"].get<std::string>(),
                     params["rate_timing"].get<std::string>());
  if (run["factors"].is_string())
    out << fmt::format("  factors {}\n", run["factors"].get<std::string>());
  out << fmt::format("  sample {} to {}: {} {} periods ({} dropped)\n",
                     sample["first"].get<std::string>(), sample["last"].get<std::string>(),
                     sample["observations"].get<int>(), frequency, sample["dropped"].get<int>());
  out << fmt::format(
      "  standard errors {}; {:g}% intervals, Student t with {} degrees of freedom\n\n",
      report::describe_errors(stats), 100 * stats["confidence"].get<double>(),
      stats["degrees_of_freedom"].get<int>());

  Table table;
  table.header = {"term", "estimate", "std error", "t", "p", "interval low", "interval high"};
  table.right_aligned = {false, true, true, true, true, true, true};
  for (const auto& c : run["coefficients"])
    table.rows.push_back({c["term"].get<std::string>(), fixed(c["estimate"], 6),
                          fixed(c["std_error"], 6), fixed(c["t_stat"], 2), p_text(c["p_value"]),
                          fixed(c["ci_low"], 6), fixed(c["ci_high"], 6)});
  std::ostringstream t;
  print_table(t, table);
  std::istringstream lines(t.str());
  for (std::string line; std::getline(lines, line);) out << "  " << line << '\n';
  out << fmt::format("  (alpha is a decimal return {}; slopes are unitless)\n\n", unit);

  out << fmt::format("  alpha annualized       {} a year ({})\n", pct(stats["alpha_annualized"]),
                     params["annualize"].get<std::string>());
  out << fmt::format("  R-squared              {} (adjusted {}); residual sd {} {}\n",
                     fixed(stats["r_squared"], 3), fixed(stats["adj_r_squared"], 3),
                     fixed(stats["residual_std"], 5), unit);
  out << fmt::format("  F statistic            {} (p {}), classic\n", fixed(stats["f_stat"], 2),
                     p_text(stats["f_p_value"]));
  out << fmt::format("  Sharpe ratio           strategy {}, benchmark {} (annualized)\n",
                     fixed(stats["sharpe_strategy"], 2), fixed(stats["sharpe_benchmark"], 2));
  out << fmt::format("  appraisal ratio        {} (alpha / residual sd, annualized)\n",
                     fixed(stats["appraisal_ratio"], 2));
  out << fmt::format("  Treynor ratio          {} a year (mean excess return / beta)\n",
                     pct(stats["treynor_ratio"]));
  out << fmt::format("  tracking error         {:.2f}% a year; information ratio {} (annualized)\n",
                     100 * num(stats["tracking_error"]), fixed(stats["information_ratio"], 2));
  out << fmt::format("  mean excess return     strategy {}, benchmark {} {}\n",
                     pct(stats["mean_excess_strategy"], 3), pct(stats["mean_excess_benchmark"], 3),
                     unit);
  out << fmt::format(
      "  correlation            {}; up-market beta {} ({} periods), down-market beta {} ({} "
      "periods)\n\n",
      fixed(stats["correlation"], 3), fixed(stats["up_market_beta"], 2),
      stats["up_periods"].get<int>(), fixed(stats["down_market_beta"], 2),
      stats["down_periods"].get<int>());
  if (run.contains("rolling") && run["rolling"].is_object()) print_rolling_text(out, run);
  for (const auto& w : run["warnings"]) out << "  warning: " << w.get<std::string>() << '\n';
  if (!run["warnings"].empty()) out << '\n';
  out << "  Reading\n";
  for (const auto& sentence : run["reading"]) out << "  - " << sentence.get<std::string>() << '\n';
  out << '\n';
}

void print_runs(std::ostream& out, store::Ledger& ledger, const std::vector<std::int64_t>& runs,
                Format format) {
  if (format == Format::json) {
    ordered_json array = ordered_json::array();
    for (auto id : runs) array.push_back(ledger.load_run(id));
    print_json(out, array);
    return;
  }
  if (format == Format::table && runs.size() <= 3) {
    for (auto id : runs) print_run_text(out, ledger.load_run(id));
    return;
  }
  // Many runs: one line each, read in one query (runs of one command have consecutive ids).
  Table table;
  table.header = {"run",  "strategy", "periods", "alpha (per period)", "alpha a year", "t", "p",
                  "beta", "R2",       "errors"};
  table.right_aligned = {true, false, true, true, true, true, true, true, true, false};
  store::RunFilter filter;
  filter.staleness = false;  // runs just recorded are not stale, and the table has no column for it
  if (!runs.empty()) {
    filter.first_run = *std::min_element(runs.begin(), runs.end());
    filter.last_run = *std::max_element(runs.begin(), runs.end());
  }
  const std::set<std::int64_t> wanted(runs.begin(), runs.end());
  const auto number = [](double v, int digits) {
    return std::isnan(v) ? std::string("n/a") : fmt::format("{:.{}f}", v, digits);
  };
  const auto summaries = runs.empty() ? std::vector<store::RunSummary>{} : ledger.list_runs(filter);
  for (const auto& r : summaries) {
    if (wanted.count(r.run_id) == 0) continue;
    table.rows.push_back(
        {std::to_string(r.run_id), r.strategy, std::to_string(r.observations), number(r.alpha, 6),
         std::isnan(r.alpha_annualized) ? "n/a" : fmt::format("{:+.2f}%", 100 * r.alpha_annualized),
         number(r.alpha_t, 2),
         std::isnan(r.alpha_p) ? "n/a"
         : r.alpha_p < 0.0001  ? "<0.0001"
                               : fmt::format("{:.4f}", r.alpha_p),
         number(r.beta, 3), number(r.r_squared, 3),
         r.errors + (r.errors == "newey-west" ? fmt::format(" ({} lags)", r.lags) : "")});
  }
  if (format == Format::csv) {
    print_csv(out, table);
    return;
  }
  print_table(out, table);
  out << fmt::format("\n{} runs recorded; `alphatrail show RUN` prints one in full.\n",
                     runs.size());
  for (const auto& c : core::standard_cautions()) out << c << '\n';
}

}  // namespace alphatrail::cli

namespace alphatrail::cli {

std::string RollingChoice::text() const {
  switch (mode) {
    case Mode::off: return "off";
    case Mode::automatic: return "auto";
    case Mode::periods: break;
  }
  return std::to_string(periods);
}

EvaluateRequest request_from_run(store::Ledger& ledger, std::int64_t run_id, bool pin_versions) {
  const record::RunRow row = ledger.existing_run_row(run_id);
  // The one reader of stored parameters: a field it cannot read stops here (exit 8) rather
  // than deep in the evaluation. Re-runs and reproductions read the stored result too.
  const auto p = record::read_parameters(run_id, row.engine_version, row.parameters_json);
  record::read_result(run_id, row.result_json);
  EvaluateRequest rq;
  rq.strategies = {row.strategy};
  rq.benchmark = row.benchmark;
  rq.rate = row.rate.substr(0, row.rate.rfind(':'));
  if (p.tenor_rule == record::TenorRule::given) rq.rate_tenor = p.rate_tenor;
  rq.factors = p.factors;
  if (p.frequency_rule == record::FrequencyRule::given) rq.frequency = p.frequency;
  if (p.from) rq.from = core::format_date(*p.from);
  if (p.to) rq.to = core::format_date(*p.to);
  rq.errors = p.errors;
  rq.lags = p.lags;
  rq.small_sample = p.small_sample;
  rq.confidence = p.confidence;
  rq.rate_basis = p.rate_basis;
  rq.rate_timing = p.rate_timing;
  rq.annualize = p.annualize;
  if (p.rolling_window) rq.rolling = {RollingChoice::Mode::periods, *p.rolling_window};
  rq.study = row.study.value_or("");
  rq.note = row.note.value_or("");
  if (pin_versions)
    for (const auto& in : ledger.read_run_inputs(run_id))
      rq.pinned_versions[in.series] = in.version;
  return rq;
}

}  // namespace alphatrail::cli
