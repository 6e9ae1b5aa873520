#include <SQLiteCpp/Statement.h>
#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <condition_variable>
#include <limits>
#include <mutex>
#include <tuple>

#include "core/error.h"
#include "core/parallel.h"
#include "core/sha256.h"
#include "core/timings.h"
#include "record/run_parameters.h"
#include "record/stored_result.h"
#include "store/sqlite_ledger.h"
#include "version.h"

namespace alphatrail::store {

namespace {

using ordered_json = nlohmann::ordered_json;

void bind_double(SQLite::Statement& q, int index, double v) {
  if (std::isnan(v))
    q.bind(index);
  else
    q.bind(index, v);
}

double column_double(const SQLite::Column& c) {
  return c.isNull() ? NAN : c.getDouble();
}

std::optional<std::string> column_text(const SQLite::Column& c) {
  if (c.isNull()) return std::nullopt;
  return c.getString();
}

void insert_row(SqliteLedger& ledger, const record::RunRow& row) {
  auto insert = ledger.statement(
      "INSERT INTO runs (run_id, created_at, engine_version, strategy, benchmark, rate, factors, "
      "study, note, revises_run_id, parameters_json, inputs_hash, frequency, first_period, "
      "last_period, observations, dropped_periods, errors, lags, alpha, alpha_std_error, alpha_t, "
      "alpha_p, alpha_annualized, beta, beta_t, r_squared, result_json, previous_record_hash, "
      "record_hash) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, "
      "?, ?, ?, ?, ?, ?, ?)");
  int i = 1;
  const auto bind_optional = [&](const std::optional<std::string>& v) {
    if (v)
      insert->bindNoCopy(i, *v);
    else
      insert->bind(i);
    ++i;
  };
  insert->bind(i++, row.run_id);
  insert->bindNoCopy(i++, row.created_at);
  insert->bindNoCopy(i++, row.engine_version);
  insert->bindNoCopy(i++, row.strategy);
  insert->bindNoCopy(i++, row.benchmark);
  insert->bindNoCopy(i++, row.rate);
  bind_optional(row.factors);
  bind_optional(row.study);
  bind_optional(row.note);
  if (row.revises_run_id)
    insert->bind(i++, *row.revises_run_id);
  else
    insert->bind(i++);
  insert->bindNoCopy(i++, row.parameters_json);
  insert->bindNoCopy(i++, row.inputs_hash);
  insert->bindNoCopy(i++, row.frequency);
  insert->bindNoCopy(i++, row.first_period);
  insert->bindNoCopy(i++, row.last_period);
  insert->bind(i++, row.observations);
  insert->bind(i++, row.dropped_periods);
  insert->bindNoCopy(i++, row.errors);
  insert->bind(i++, row.lags);
  for (double v : {row.alpha, row.alpha_std_error, row.alpha_t, row.alpha_p, row.alpha_annualized,
                   row.beta, row.beta_t, row.r_squared})
    bind_double(*insert, i++, v);
  insert->bindNoCopy(i++, row.result_json);
  insert->bindNoCopy(i++, row.previous_record_hash);
  insert->bindNoCopy(i++, row.record_hash);
  insert->exec();

  auto add_input = ledger.statement(
      "INSERT INTO run_inputs (run_id, role, position, version_id, "
      "columns) VALUES (?, ?, ?, ?, ?)");
  for (const auto& in : row.inputs) {
    add_input->reset();
    add_input->bind(1, row.run_id);
    add_input->bindNoCopy(2, in.role);
    add_input->bind(3, in.position);
    add_input->bind(4, in.version_id);
    add_input->bindNoCopy(5, in.columns);
    add_input->exec();
  }
  auto add_coefficient = ledger.statement(
      "INSERT INTO run_coefficients (run_id, position, term, estimate, std_error, t_stat, "
      "p_value, ci_low, ci_high) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)");
  for (std::size_t c = 0; c < row.coefficients.size(); ++c) {
    const auto& co = row.coefficients[c];
    add_coefficient->reset();
    add_coefficient->bind(1, row.run_id);
    add_coefficient->bind(2, static_cast<int>(c + 1));
    add_coefficient->bindNoCopy(3, co.term);
    int k = 4;
    for (double v : {co.estimate, co.std_error, co.t_stat, co.p_value, co.ci_low, co.ci_high})
      bind_double(*add_coefficient, k++, v);
    add_coefficient->exec();
  }
}

}  // namespace

std::vector<std::int64_t> SqliteLedger::store_runs(
    const std::vector<const record::NewRun*>& runs,
    const std::function<void(std::size_t)>& on_stored) {
  std::int64_t last_id = 0;
  std::string previous = record::kGenesisHash;
  {
    auto head = statement("SELECT run_id, record_hash FROM runs ORDER BY run_id DESC LIMIT 1");
    if (head->executeStep()) {
      last_id = head->getColumn(0).getInt64();
      previous = head->getColumn(1).getString();
    }
  }
  const std::string created_at = utc_now();  // one transaction, one time of recording

  struct Draft {
    record::RunRow row;
    std::string before;  // canonical record up to the previous run's hash
    std::string after;   // and from it on
  };
  // Worker threads draft the rows in order while this thread (task 0, the one that owns the
  // connection) chains and inserts each as soon as it is ready: the inserts are serial, so the
  // drafting hides behind them.
  std::vector<Draft> drafts(runs.size());
  std::vector<bool> ready(runs.size(), false);
  bool draft_failed = false;
  std::mutex mutex;
  std::condition_variable drafted;
  std::atomic<std::size_t> next{0};
  std::vector<std::int64_t> ids;
  ids.reserve(runs.size());

  const auto draft = [&] {
    try {
      for (std::size_t i = next++; i < runs.size(); i = next++) {
        Draft& d = drafts[i];
        d.row = record::draft_row(*runs[i], last_id + 1 + static_cast<std::int64_t>(i), created_at);
        std::tie(d.before, d.after) = record::canonical_record_parts(d.row);
        std::lock_guard lock(mutex);
        ready[i] = true;
        drafted.notify_all();
      }
    } catch (...) {
      {
        std::lock_guard lock(mutex);
        draft_failed = true;
      }
      drafted.notify_all();
      throw;
    }
  };
  const auto insert = [&] {
    // Chained in order: each record hash covers the one before; before + previous + after is
    // record::canonical_run_record(row), what verify hashes.
    for (std::size_t i = 0; i < runs.size(); ++i) {
      {
        std::unique_lock lock(mutex);
        drafted.wait(lock, [&] { return ready[i] || draft_failed; });
        if (!ready[i]) return;  // the drafter's error is the one run_parallel reports
      }
      Draft& d = drafts[i];
      d.row.previous_record_hash = previous;
      d.row.record_hash = record::chain_hash(previous, d.before + previous + d.after);
      insert_row(*this, d.row);
      previous = d.row.record_hash;
      ids.push_back(d.row.run_id);
      if (on_stored) on_stored(ids.size());
      d = Draft{};  // the row's text is in the ledger now
    }
  };
  const unsigned drafters = core::worker_count(runs.size(), 16);
  core::run_parallel(1 + drafters, [&](std::size_t task) {
    if (task == 0)
      insert();
    else
      draft();
  });
  return ids;
}

std::optional<record::RunRow> SqliteLedger::read_run_row(std::int64_t run_id) {
  SQLite::Database& db = *db_;
  SQLite::Statement q(
      db,
      "SELECT run_id, created_at, engine_version, strategy, benchmark, rate, factors, study, "
      "note, revises_run_id, parameters_json, inputs_hash, frequency, first_period, last_period, "
      "observations, dropped_periods, errors, lags, alpha, alpha_std_error, alpha_t, alpha_p, "
      "alpha_annualized, beta, beta_t, r_squared, result_json, previous_record_hash, record_hash "
      "FROM runs WHERE run_id = ?");
  q.bind(1, run_id);
  if (!q.executeStep()) return std::nullopt;
  record::RunRow r;
  r.run_id = q.getColumn(0).getInt64();
  r.created_at = q.getColumn(1).getString();
  r.engine_version = q.getColumn(2).getString();
  r.strategy = q.getColumn(3).getString();
  r.benchmark = q.getColumn(4).getString();
  r.rate = q.getColumn(5).getString();
  r.factors = column_text(q.getColumn(6));
  r.study = column_text(q.getColumn(7));
  r.note = column_text(q.getColumn(8));
  if (!q.getColumn(9).isNull()) r.revises_run_id = q.getColumn(9).getInt64();
  r.parameters_json = q.getColumn(10).getString();
  r.inputs_hash = q.getColumn(11).getString();
  r.frequency = q.getColumn(12).getString();
  r.first_period = q.getColumn(13).getString();
  r.last_period = q.getColumn(14).getString();
  r.observations = q.getColumn(15).getInt();
  r.dropped_periods = q.getColumn(16).getInt();
  r.errors = q.getColumn(17).getString();
  r.lags = q.getColumn(18).getInt();
  r.alpha = column_double(q.getColumn(19));
  r.alpha_std_error = column_double(q.getColumn(20));
  r.alpha_t = column_double(q.getColumn(21));
  r.alpha_p = column_double(q.getColumn(22));
  r.alpha_annualized = column_double(q.getColumn(23));
  r.beta = column_double(q.getColumn(24));
  r.beta_t = column_double(q.getColumn(25));
  r.r_squared = column_double(q.getColumn(26));
  r.result_json = q.getColumn(27).getString();
  r.previous_record_hash = q.getColumn(28).getString();
  r.record_hash = q.getColumn(29).getString();

  SQLite::Statement inputs(db,
                           "SELECT role, position, version_id, columns FROM run_inputs WHERE "
                           "run_id = ? ORDER BY CASE role WHEN 'strategy' THEN 1 WHEN "
                           "'benchmark' THEN 2 WHEN 'rate' THEN 3 ELSE 4 END, position");
  inputs.bind(1, run_id);
  while (inputs.executeStep())
    r.inputs.push_back({inputs.getColumn(0).getString(), inputs.getColumn(1).getInt(),
                        inputs.getColumn(2).getInt64(), inputs.getColumn(3).getString()});
  SQLite::Statement coefficients(
      db,
      "SELECT term, estimate, std_error, t_stat, p_value, ci_low, "
      "ci_high FROM run_coefficients WHERE run_id = ? ORDER BY position");
  coefficients.bind(1, run_id);
  while (coefficients.executeStep()) {
    core::Coefficient c;
    c.term = coefficients.getColumn(0).getString();
    c.estimate = column_double(coefficients.getColumn(1));
    c.std_error = column_double(coefficients.getColumn(2));
    c.t_stat = column_double(coefficients.getColumn(3));
    c.p_value = column_double(coefficients.getColumn(4));
    c.ci_low = column_double(coefficients.getColumn(5));
    c.ci_high = column_double(coefficients.getColumn(6));
    r.coefficients.push_back(c);
  }
  return r;
}

std::vector<record::RunInput> SqliteLedger::read_run_inputs(std::int64_t run_id) {
  SQLite::Statement q(*db_,
                      "SELECT i.role, i.position, i.version_id, s.name, v.version, "
                      "v.content_hash, i.columns FROM run_inputs i JOIN series_versions v ON "
                      "v.version_id = i.version_id JOIN series s ON s.series_id = v.series_id "
                      "WHERE i.run_id = ? ORDER BY CASE i.role WHEN 'strategy' THEN 1 WHEN "
                      "'benchmark' THEN 2 WHEN 'rate' THEN 3 ELSE 4 END, i.position");
  q.bind(1, run_id);
  std::vector<record::RunInput> inputs;
  while (q.executeStep()) {
    record::RunInput in;
    in.role = q.getColumn(0).getString();
    in.position = q.getColumn(1).getInt();
    in.version_id = q.getColumn(2).getInt64();
    in.series = q.getColumn(3).getString();
    in.version = q.getColumn(4).getInt();
    in.content_hash = q.getColumn(5).getString();
    const std::string columns = q.getColumn(6).getString();
    std::size_t start = 0;
    while (!columns.empty()) {
      const auto comma = columns.find(',', start);
      in.columns.push_back(columns.substr(start, comma - start));
      if (comma == std::string::npos) break;
      start = comma + 1;
    }
    inputs.push_back(std::move(in));
  }
  return inputs;
}

int SqliteLedger::count_study_runs(const std::string& study) {
  if (study.empty()) return 0;
  auto q = statement("SELECT count(*) FROM runs WHERE study = ?");
  q->bind(1, study);
  q->executeStep();
  return q->getColumn(0).getInt();
}

int SqliteLedger::count_strategy_runs(const std::string& strategy) {
  auto q = statement("SELECT count(*) FROM runs WHERE strategy = ?");
  q->bind(1, strategy);
  q->executeStep();
  return q->getColumn(0).getInt();
}

std::vector<record::ShownInput> SqliteLedger::read_shown_inputs(std::int64_t run_id) {
  SQLite::Statement q(*db_,
                      "SELECT i.role, i.position, s.name, v.version, v.content_hash, i.columns, "
                      "v.source_file, coalesce(v.note, ''), (SELECT max(version) FROM "
                      "series_versions w WHERE w.series_id = v.series_id) FROM run_inputs i "
                      "JOIN series_versions v ON v.version_id = i.version_id JOIN series s ON "
                      "s.series_id = v.series_id WHERE i.run_id = ? ORDER BY CASE i.role WHEN "
                      "'strategy' THEN 1 WHEN 'benchmark' THEN 2 WHEN 'rate' THEN 3 ELSE 4 END, "
                      "i.position");
  q.bind(1, run_id);
  std::vector<record::ShownInput> out;
  while (q.executeStep())
    out.push_back({q.getColumn(0).getString(), q.getColumn(2).getString(), q.getColumn(3).getInt(),
                   q.getColumn(4).getString(), q.getColumn(5).getString(),
                   q.getColumn(6).getString(), q.getColumn(7).getString(),
                   q.getColumn(8).getInt()});
  return out;
}

ordered_json SqliteLedger::load_run(std::int64_t run_id) {
  const record::RunRow row = existing_run_row(run_id);
  ordered_json inputs = ordered_json::array();
  for (const auto& in : read_shown_inputs(run_id))
    inputs.push_back({{"role", in.role},
                      {"series", in.series},
                      {"version", in.version},
                      {"content_hash", in.content_hash},
                      {"columns", in.columns},
                      {"source_file", in.source_file},
                      {"note", in.note},
                      {"latest_version", in.latest_version}});
  // Both stored texts are read checked: a field that is not what the engine writes stops here,
  // naming the run and the field, so that every reader of the run object may read it by key.
  ordered_json parameters;
  record::read_parameters(run_id, row.engine_version, row.parameters_json, &parameters);
  const ordered_json result = record::read_result(run_id, row.result_json);
  ordered_json run = {
      {"run_id", row.run_id},
      {"created_at", row.created_at},
      {"engine_version", row.engine_version},
      {"inputs_hash", row.inputs_hash},
      {"strategy", row.strategy},
      {"benchmark", row.benchmark},
      {"rate", row.rate},
      {"factors", row.factors ? ordered_json(*row.factors) : ordered_json()},
      {"study", row.study ? ordered_json(*row.study) : ordered_json()},
      {"note", row.note ? ordered_json(*row.note) : ordered_json()},
      {"revises_run_id", row.revises_run_id ? ordered_json(*row.revises_run_id) : ordered_json()},
      {"parameters", std::move(parameters)},
      {"inputs", inputs}};
  for (const auto& [key, value] : result.items()) run[key] = value;
  if (!run.contains("rolling")) run["rolling"] = nullptr;  // runs recorded before engine 0.2.0
  run["record_hash"] = row.record_hash;
  return run;
}

std::vector<RunSummary> SqliteLedger::list_runs(const RunFilter& filter) {
  SQLite::Statement q(
      *db_,
      // run_summary holds the one definition of stale; CASE evaluates it only when asked.
      "SELECT s.run_id, s.created_at, s.strategy, s.benchmark, coalesce(s.study, ''), "
      "s.inputs_hash, s.frequency, s.observations, s.alpha, s.alpha_annualized, s.alpha_t, "
      "s.alpha_p, s.beta, s.r_squared, s.errors, s.lags, s.revises_run_id, CASE WHEN ?5 THEN "
      "s.stale ELSE 0 END FROM run_summary s WHERE (?1 = '' OR s.strategy = ?1) AND (?2 = '' OR "
      "s.study = ?2) AND s.run_id BETWEEN ?3 AND ?4 ORDER BY s.run_id");
  q.bind(1, filter.strategy);
  q.bind(2, filter.study);
  // Plain bounds, so that SQLite reads only the rows in range.
  q.bind(3, filter.first_run);
  q.bind(4, filter.last_run == 0 ? std::numeric_limits<std::int64_t>::max() : filter.last_run);
  q.bind(5, filter.staleness ? 1 : 0);
  std::vector<RunSummary> out;
  while (q.executeStep()) {
    RunSummary s;
    s.run_id = q.getColumn(0).getInt64();
    s.created_at = q.getColumn(1).getString();
    s.strategy = q.getColumn(2).getString();
    s.benchmark = q.getColumn(3).getString();
    s.study = q.getColumn(4).getString();
    s.inputs_hash = q.getColumn(5).getString();
    s.frequency = q.getColumn(6).getString();
    s.observations = q.getColumn(7).getInt();
    s.alpha = column_double(q.getColumn(8));
    s.alpha_annualized = column_double(q.getColumn(9));
    s.alpha_t = column_double(q.getColumn(10));
    s.alpha_p = column_double(q.getColumn(11));
    s.beta = column_double(q.getColumn(12));
    s.r_squared = column_double(q.getColumn(13));
    s.errors = q.getColumn(14).getString();
    s.lags = q.getColumn(15).getInt();
    if (!q.getColumn(16).isNull()) s.revises_run_id = q.getColumn(16).getInt64();
    s.stale = q.getColumn(17).getInt() != 0;
    out.push_back(s);
  }
  return out;
}

std::vector<std::int64_t> SqliteLedger::unrevised_stale_runs() {
  std::vector<std::int64_t> ids;
  SQLite::Statement q(*db_,
                      "SELECT run_id FROM run_summary s WHERE stale AND NOT EXISTS (SELECT 1 "
                      "FROM runs r WHERE r.revises_run_id = s.run_id) ORDER BY run_id");
  while (q.executeStep()) ids.push_back(q.getColumn(0).getInt64());
  return ids;
}

std::vector<NewerInput> SqliteLedger::newer_input_versions(std::int64_t run_id) {
  std::vector<NewerInput> out;
  SQLite::Statement q(*db_,
                      "SELECT series, version, latest_version FROM run_input_versions WHERE "
                      "run_id = ? AND latest_version > version");
  q.bind(1, run_id);
  while (q.executeStep())
    out.push_back({q.getColumn(0).getString(), q.getColumn(1).getInt(), q.getColumn(2).getInt()});
  return out;
}

}  // namespace alphatrail::store
