#include <fcntl.h>
#include <fmt/format.h>
#include <sys/stat.h>
#include <unistd.h>

#include <CLI/CLI.hpp>
#include <fstream>
#include <iostream>

#include "app/evaluate.h"
#include "cli/commands.h"
#include "cli/report.h"
#include "core/error.h"
#include "record/stored_result.h"
#include "report/html.h"
#include "report/reports.h"
#include "store/ledger.h"
#include "version.h"

namespace alphatrail::cli {

namespace {

// Where a page goes: the ledger it must never overwrite, and whether --force was given.
struct PageTarget {
  std::filesystem::path ledger;
  bool force = false;
};

std::string made_by(store::Ledger& ledger) {
  return fmt::format(
      "Made by alphatrail {} on {} UTC from the ledger {}. Self-contained page: "
      "no script, nothing loaded from elsewhere.",
      kEngineVersion, store::utc_now(), ledger.path().filename().string());
}

bool same_file(const std::filesystem::path& a, const std::filesystem::path& b) {
  struct stat sa {};
  struct stat sb {};
  return ::stat(a.c_str(), &sa) == 0 && ::stat(b.c_str(), &sb) == 0 && sa.st_dev == sb.st_dev &&
         sa.st_ino == sb.st_ino;
}

// Refuses to write the page over the ledger (or its journal files), whatever name or link
// reaches it, and over an existing file that is not a page of ours unless `force`.
void check_output(const std::filesystem::path& output, const PageTarget& target) {
  for (const char* suffix : {"", "-wal", "-shm", "-journal"}) {
    const std::filesystem::path ledger_file = target.ledger.string() + suffix;
    if (same_file(output, ledger_file))
      throw Error(Failure::invalid_argument,
                  fmt::format("{} is the ledger file {} that the report reads: refusing to write "
                              "the page over it (--force does not apply); name another file "
                              "with -o",
                              output.string(), ledger_file.string()));
  }
  std::error_code ec;
  if (!std::filesystem::exists(output, ec)) return;
  // A device, a folder or a pipe is never replaced, --force or not (as root, renaming over
  // /dev/null would replace the device itself).
  if (!std::filesystem::is_regular_file(output, ec))
    throw Error(Failure::invalid_argument,
                fmt::format("{} exists and is not a regular file: refusing to write the page "
                            "there (--force does not apply); name another file with -o",
                            output.string()));
  if (target.force) return;
  std::ifstream in(output, std::ios::binary);
  const std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  if (!report::is_our_page(text))
    throw Error(Failure::invalid_argument,
                fmt::format("{} exists and is not a report page alphatrail wrote: refusing to "
                            "overwrite it; name another file with -o, or pass --force to "
                            "replace it",
                            output.string()));
}

// Writes through a temporary file beside the target, then renames it into place.
void write_page(const std::filesystem::path& output, const std::string& html,
                const PageTarget& target) {
  check_output(output, target);
  const Error unwritable(Failure::bad_input,
                         fmt::format("{}: cannot write the report there; name a writable file "
                                     "with -o",
                                     output.string()));
  const std::filesystem::path temporary =
      output.string() + fmt::format(".{}.partial", static_cast<long>(::getpid()));
  // O_EXCL: the temporary name is never an existing file of someone else's.
  const int fd = ::open(temporary.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0644);
  if (fd < 0) throw unwritable;
  std::size_t written = 0;
  while (written < html.size()) {
    const ssize_t n = ::write(fd, html.data() + written, html.size() - written);
    if (n <= 0) break;
    written += static_cast<std::size_t>(n);
  }
  const bool complete = written == html.size() && ::close(fd) == 0;
  std::error_code ec;
  if (complete) std::filesystem::rename(temporary, output, ec);
  if (!complete || ec) {
    std::filesystem::remove(temporary, ec);
    throw unwritable;
  }
}

std::vector<record::ShownRun> load_runs(store::Ledger& ledger, const store::RunFilter& filter) {
  std::vector<record::ShownRun> runs;
  for (const auto& summary : ledger.list_runs(filter))
    runs.push_back(ledger.load_run_record(summary.run_id));
  return runs;
}

}  // namespace

void write_run_report(store::Ledger& ledger, std::int64_t run_id,
                      const std::filesystem::path& output, bool force) {
  report::RunReportInput in;
  in.run = ledger.load_run_record(run_id);

  // The charts need the sample period by period: recompute it from the run's own versions.
  app::EvaluateRequest request = app::request_from_run(ledger, run_id, true);
  request.keep_series = true;
  auto pending = app::evaluate_request(ledger, request);
  const app::PendingRun& p = pending.front();
  const std::string recomputed =
      record::inputs_hash(kEngineVersion, p.run.parameters_json, p.run.inputs);
  in.reproduction =
      recomputed == in.run.row.inputs_hash
          ? "recomputed from the run's own input versions and parameters; inputs hash identical"
          : fmt::format(
                "recomputed from the run's own input versions by engine {} (the run was "
                "recorded by {}): inputs hash {} differs, so the charts may differ "
                "slightly from the recorded figures",
                kEngineVersion, in.run.row.engine_version, recomputed.substr(0, 12));
  const auto& r = p.result;
  for (const auto key : r.keys)
    in.data.periods.push_back(core::period_label(r.sample.frequency, key));
  in.data.strategy_excess = r.strategy_excess;
  in.data.benchmark_excess = r.benchmark_excess;
  in.data.risk_free = r.risk_free;
  in.data.residuals.assign(r.fit.residuals.begin(), r.fit.residuals.end());

  in.rolling = in.run.result.rolling;
  in.rolling_from_run = in.rolling.has_value();
  if (!in.rolling_from_run) {
    // Recorded without --rolling: compute the default window for the page (and say so).
    request.rolling = {app::RollingChoice::Mode::automatic, 0};
    try {
      in.rolling =
          record::run_result(app::evaluate_request(ledger, request).front().result, {}).rolling;
    } catch (const Error&) {  // the sample is shorter than the window: the page says so
    }
  }
  if (in.run.row.revises_run_id) in.revised = ledger.load_run_record(*in.run.row.revises_run_id);
  in.made_by = made_by(ledger);
  write_page(output, report::run_report(in), {ledger.path(), force});
}

void write_strategy_report(store::Ledger& ledger, const std::string& strategy,
                           const std::filesystem::path& output, bool force) {
  report::StrategyReportInput in;
  in.strategy = strategy;
  for (const auto& v : ledger.version_history(strategy))
    in.versions.push_back({v.version, v.ingested_at, v.content_hash, v.source_file, v.note});
  in.runs = load_runs(ledger, {strategy, "", 0, 0});
  if (in.runs.empty())
    throw Error(Failure::not_found,
                fmt::format("strategy '{}' has no runs yet; evaluate it first (`alphatrail "
                            "evaluate {} --benchmark ... --rate ...`)",
                            strategy, strategy));
  in.made_by = made_by(ledger);
  write_page(output, report::strategy_report(in), {ledger.path(), force});
}

void write_study_report(store::Ledger& ledger, const std::string& study,
                        const std::filesystem::path& output, bool force) {
  report::StudyReportInput in;
  in.study = study;
  in.runs = load_runs(ledger, {"", study, 0, 0});
  if (in.runs.empty())
    throw Error(Failure::not_found,
                fmt::format("no run belongs to study '{}'; `alphatrail runs` lists the studies, "
                            "and `evaluate --study NAME` records runs in one",
                            study));
  in.made_by = made_by(ledger);
  write_page(output, report::study_report(in), {ledger.path(), force});
}

namespace {

struct ReportOptions {
  std::int64_t run_id = 0;
  std::string strategy;
  std::string study;
  std::string output;
  bool force = false;
};

void run_report(const ReportOptions& o, const GlobalOptions& global) {
  const int chosen = (o.run_id != 0) + !o.strategy.empty() + !o.study.empty();
  if (chosen != 1)
    throw Error(Failure::invalid_argument,
                "name one subject: a RUN id, --strategy NAME or --study NAME (for example "
                "`alphatrail report 7 -o run-7.html`)");
  auto ledger_opened = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                          store::OpenMode::read_only, std::cerr);
  store::Ledger& ledger = *ledger_opened;
  if (o.run_id != 0)
    write_run_report(ledger, o.run_id, o.output, o.force);
  else if (!o.strategy.empty())
    write_strategy_report(ledger, o.strategy, o.output, o.force);
  else
    write_study_report(ledger, o.study, o.output, o.force);
  std::cout << fmt::format("report written to {}\n", o.output);
}

}  // namespace

void setup_report(CLI::App& app, const GlobalOptions& global) {
  auto o = std::make_shared<ReportOptions>();
  auto* cmd = app.add_subcommand(
      "report", "Write a self-contained HTML page with charts for a run, a strategy or a study");
  cmd->add_option("run", o->run_id, "Run id (or use --strategy / --study)");
  cmd->add_option("--strategy", o->strategy, "Every run of a strategy, in time order");
  cmd->add_option("--study", o->study, "Every run of a study, side by side");
  cmd->add_option("-o,--output", o->output,
                  "The HTML file to write; an existing file is replaced only when it is a report "
                  "page alphatrail wrote (never the ledger)")
      ->required();
  cmd->add_flag("--force", o->force,
                "Replace an existing -o file even when it is not a report page (never the ledger)");
  cmd->callback([o, &global] { run_report(*o, global); });
}

}  // namespace alphatrail::cli
