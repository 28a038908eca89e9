#pragma once
// Exit codes of the `unchain` program (docs/cli.md). Scripts rely on them,
// so they never change meaning.

#include <stdexcept>

#include "costs/closure_check.hpp"

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

// The closure limits behind exit code 3 are those of
// costs/closure_check.hpp, shared with every study.
using costs::energy_closure_limit;
using costs::mass_closure_limit;

// A wrong command-line argument found after parsing (an unknown component,
// a value with a bad unit): exit code 2. The message names the option.
class UsageError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

}  // namespace unchain::app
