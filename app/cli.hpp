#pragma once
// The `unchain` command line: parses arguments, runs the command, maps
// errors to exit codes (0 success, 1 other failure, 2 bad input or usage,
// 3 no convergence or an open balance).

namespace unchain::app {

int run_cli(int argc, char** argv);

}  // namespace unchain::app
