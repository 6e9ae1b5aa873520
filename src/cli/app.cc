#include "cli/app.h"

#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <iostream>

#include "cli/commands.h"
#include "cli/exit_codes.h"
#include "core/error.h"
#include "version.h"

namespace alphatrail::cli {

namespace {

int report(Failure kind, const std::string& message) {
  std::cerr << "alphatrail: error: " << message << '\n';
  return exit_code(kind);
}

}  // namespace

int run_app(int argc, char** argv) {
  CLI::App app{
      "alphatrail: test whether trading strategies earn alpha, and keep a ledger of "
      "every test.",
      "alphatrail"};
  app.footer(exit_code_footer());
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
    return exit_code(Failure::invalid_argument);
  } catch (const Error& e) {
    return report(e.kind(), e.what());
  } catch (const std::exception& e) {
    return report(Failure::internal, fmt::format("internal error: {}", e.what()));
  }
}

}  // namespace alphatrail::cli
