#include <CLI/CLI.hpp>

#include "cli/commands.h"

namespace alphatrail::cli {

void setup_demo(CLI::App& app, const GlobalOptions& /*global*/) {
  app.add_subcommand("demo", "Build a demo ledger from invented data and run the main job on it");
}

}  // namespace alphatrail::cli
