// The commands of alphatrail. Each lives in its own cmd_NAME.cc with an options struct, a
// setup_NAME that declares its options, and a run_NAME that does the work.
#pragma once

#include <string>

namespace CLI {
class App;
}

namespace alphatrail::cli {

// Options every command accepts, before or after the command name.
struct GlobalOptions {
  std::string ledger;  // --ledger PATH; empty: $ALPHATRAIL_LEDGER or ./alphatrail.db
};

void setup_init(CLI::App& app, const GlobalOptions& global);
void setup_ingest(CLI::App& app, const GlobalOptions& global);
void setup_series(CLI::App& app, const GlobalOptions& global);
void setup_demo(CLI::App& app, const GlobalOptions& global);
void setup_evaluate(CLI::App& app, const GlobalOptions& global);
void setup_runs(CLI::App& app, const GlobalOptions& global);
void setup_show(CLI::App& app, const GlobalOptions& global);
void setup_verify(CLI::App& app, const GlobalOptions& global);
void setup_query(CLI::App& app, const GlobalOptions& global);
void setup_rerun(CLI::App& app, const GlobalOptions& global);
void setup_reproduce(CLI::App& app, const GlobalOptions& global);
void setup_compare(CLI::App& app, const GlobalOptions& global);
void setup_report(CLI::App& app, const GlobalOptions& global);

}  // namespace alphatrail::cli
