#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <iostream>
#include <sstream>

#include "cli/commands.h"
#include "store/ledger.h"

namespace alphatrail::cli {

namespace {

void run_init(const GlobalOptions& global) {
  const auto path = store::resolve_ledger_path(global.ledger);
  const bool existed = std::filesystem::exists(path);
  std::ostringstream notices;  // init reports on stdout: creating is its job
  auto ledger_opened = store::open_ledger(path, store::OpenMode::create, notices);
  store::Ledger& ledger = *ledger_opened;
  std::cout << notices.str();
  if (existed && notices.str().empty())
    std::cout << fmt::format("ledger {} is up to date (schema version {})\n", path.string(),
                             ledger.schema_version());
}

}  // namespace

void setup_init(CLI::App& app, const GlobalOptions& global) {
  auto* cmd = app.add_subcommand("init", "Create a ledger (or upgrade an older one)");
  cmd->callback([&global] { run_init(global); });
}

}  // namespace alphatrail::cli
