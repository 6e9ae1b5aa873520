// The command-line application: builds the CLI11 command tree and runs one command.
#pragma once

namespace alphatrail::cli {

// Runs alphatrail with the process arguments and returns the process exit code.
int run_app(int argc, char** argv);

}  // namespace alphatrail::cli
