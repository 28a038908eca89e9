#pragma once
// Exit codes of the `unchain` program (docs/cli.md). Scripts rely on them,
// so they never change meaning.

#include <stdexcept>

namespace unchain::app {

inline constexpr int exit_success = 0;
// Anything unexpected: a failure of the program rather than of the input.
inline constexpr int exit_failure = 1;
// Bad input or usage: a case file with errors, an unknown component or unit,
// a block asked for the impossible, an unwritable output path, a wrong
// command-line option.
inline constexpr int exit_input_error = 2;
// A recycle loop that did not converge, or a mass, element or energy
// balance that does not close within the tolerances below.
inline constexpr int exit_not_converged = 3;

// Relative closure above which a solved case counts as not closing. A
// shipped case closes mass to 1e-9 and energy to 1e-6; these limits leave a
// margin for user cases with long recycle loops while still catching a
// block that loses material or heat.
inline constexpr double mass_closure_limit = 1e-6;
inline constexpr double energy_closure_limit = 1e-4;

// A wrong command-line argument found after parsing (an unknown component,
// a value with a bad unit): exit code 2. The message names the option.
class UsageError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

}  // namespace unchain::app
