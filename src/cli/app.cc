#include "cli/app.h"

#include <SQLiteCpp/Exception.h>
#include <fmt/format.h>
#include <sqlite3.h>

#include <CLI/CLI.hpp>
#include <iostream>

#include "cli/commands.h"
#include "core/error.h"
#include "ledger/ledger.h"
#include "version.h"

namespace alphatrail::cli {

namespace {

constexpr const char* kExitCodes =
    "Exit codes: 0 ok, 1 internal error, 2 bad command line, 3 invalid input file, 4 ledger "
    "cannot be opened or is busy, 5 named series or run not found, 6 data cannot be "
    "estimated, 7 verification found a mismatch.";

int report(ExitCode code, const std::string& message) {
  std::cerr << "alphatrail: error: " << message << '\n';
  return static_cast<int>(code);
}

}  // namespace

int run_app(int argc, char** argv) {
  CLI::App app{
      "alphatrail: test whether trading strategies earn alpha, and keep a ledger of "
      "every test.",
      "alphatrail"};
  app.footer(kExitCodes);
  app.require_subcommand(1);
  app.fallthrough();  // global options may follow the command name
  app.set_version_flag("--version", std::string("alphatrail ") + kEngineVersion);

  GlobalOptions global;
  app.add_option("--ledger", global.ledger,
                 "Ledger file (default: $ALPHATRAIL_LEDGER, else ./alphatrail.db)");

  setup_init(app, global);
  setup_ingest(app, global);
  setup_series(app, global);
  setup_evaluate(app, global);
  setup_runs(app, global);
  setup_show(app, global);
  setup_rerun(app, global);
  setup_reproduce(app, global);
  setup_compare(app, global);
  setup_report(app, global);
  setup_verify(app, global);
  setup_query(app, global);
  setup_demo(app, global);

  try {
    app.parse(argc, argv);
    return 0;
  } catch (const CLI::CallForHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForAllHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForVersion& e) {
    return app.exit(e);
  } catch (const CLI::ParseError& e) {
    app.exit(e);
    return static_cast<int>(ExitCode::usage);
  } catch (const Error& e) {
    return report(e.code(), e.what());
  } catch (const SQLite::Exception& e) {
    if (e.getErrorCode() == SQLITE_BUSY)
      return report(ExitCode::ledger,
                    fmt::format("the ledger stayed busy for {} ms (another command is writing); "
                                "nothing was written; try again or raise "
                                "ALPHATRAIL_BUSY_TIMEOUT_MS",
                                ledger::busy_timeout_ms()));
    return report(ExitCode::ledger, fmt::format("ledger error: {}; nothing was written", e.what()));
  } catch (const std::exception& e) {
    return report(ExitCode::failure, fmt::format("internal error: {}", e.what()));
  }
}

}  // namespace alphatrail::cli
