#include <CLI/CLI.hpp>

#include "cli/commands.h"

namespace alphatrail::cli {

void setup_ingest(CLI::App& app, const GlobalOptions& /*global*/) {
  app.add_subcommand("ingest", "Add series from a CSV file");
}

}  // namespace alphatrail::cli
