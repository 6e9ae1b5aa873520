#include <fmt/format.h>

#include <CLI/CLI.hpp>
#include <iostream>

#include "cli/commands.h"
#include "core/error.h"
#include "store/verify.h"

namespace alphatrail::cli {

namespace {

// Shows stored text as it is, with control and non-ASCII bytes escaped, so that tampered
// content cannot break or forge the report's lines.
std::string printable(const std::string& text) {
  std::string out;
  for (unsigned char c : text) {
    if (c >= 0x20 && c < 0x7f)
      out += static_cast<char>(c);
    else
      out += fmt::format("\\x{:02x}", c);
  }
  return out;
}

void run_verify(const GlobalOptions& global) {
  const auto ledger = store::open_ledger(store::resolve_ledger_path(global.ledger),
                                         store::OpenMode::read_only, std::cerr);
  const auto report = store::verify_ledger(*ledger);
  for (const auto& p : report.problems)
    std::cout << fmt::format("MISMATCH {}: {}\n", printable(p.object), printable(p.problem));
  std::cout << fmt::format(
      "checked {} series versions and {} runs; SQLite integrity check run; chain head {}\n",
      report.versions_checked, report.runs_checked, printable(report.chain_head));
  if (!report.ok())
    throw Error(Failure::mismatch,
                fmt::format("{} mismatch{} found in {}: the ledger was altered outside "
                            "alphatrail or is damaged; restore it from a copy",
                            report.problems.size(), report.problems.size() == 1 ? "" : "es",
                            ledger->path().string()));
  std::cout << "everything checks out\n";
}

}  // namespace

void setup_verify(CLI::App& app, const GlobalOptions& global) {
  auto* cmd = app.add_subcommand(
      "verify",
      "Recompute every content hash, inputs hash and the run hash chain; exit 7 on a mismatch");
  cmd->callback([&global] { run_verify(global); });
}

}  // namespace alphatrail::cli
