#include "app/evaluate.h"

#include <fmt/format.h>
#include <fnmatch.h>

#include <algorithm>
#include <functional>
#include <map>
#include <set>

#include "core/error.h"
#include "core/evaluation.h"
#include "core/parallel.h"
#include "core/reading.h"
#include "core/timings.h"
#include "record/content.h"
#include "record/run_parameters.h"
#include "record/stored_result.h"
#include "store/ledger.h"

namespace alphatrail::app {

namespace {

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
    shared.rate.unit = record::stored_rate_unit(rate.info.name, rate.info.unit);
    shared.rate.quote = record::stored_rate_quote(rate.info.name, rate.info.quote);
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
                                      const Progress& progress) {
  std::vector<std::int64_t> run_ids;
  std::function<void(std::size_t)> on_stored;
  if (progress) on_stored = [&](std::size_t done) { progress(done, pending.size()); };
  ledger.write_transaction([&] { run_ids = record_in_transaction(ledger, pending, on_stored); });
  return run_ids;
}

std::vector<std::int64_t> evaluate_and_record(store::Ledger& ledger, const EvaluateRequest& rq,
                                              const Progress& progress) {
  // One write transaction: the inputs come from one snapshot, each chunk of runs is written
  // while the next is evaluated, and a failure anywhere records nothing.
  std::vector<std::int64_t> run_ids;
  ledger.write_transaction([&] {
    evaluate_in_snapshot(ledger, rq, [&](std::vector<PendingRun>& chunk, std::size_t total) {
      const std::size_t before = run_ids.size();
      std::function<void(std::size_t)> on_stored;
      if (progress) on_stored = [&](std::size_t done) { progress(before + done, total); };
      const auto ids = record_in_transaction(ledger, chunk, on_stored);
      run_ids.insert(run_ids.end(), ids.begin(), ids.end());
    });
  });
  core::mark_phase("evaluate: recorded");
  return run_ids;
}

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

}  // namespace alphatrail::app
