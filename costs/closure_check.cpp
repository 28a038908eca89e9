#include "costs/closure_check.hpp"

#include <cstdio>

namespace unchain::costs {

namespace {

std::string scientific(double value, const char* format) {
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, format, value);
  return buffer;
}

void check_closure(const std::string& where, const BalanceClosure& b, std::vector<std::string>& problems) {
  // Written as !(x <= limit) so that a NaN error counts as not closing.
  if (!(b.mass_relative_error <= mass_closure_limit))
    problems.push_back("mass balance " + where + " does not close: relative error " +
                       scientific(b.mass_relative_error, "%.2e") + " > " + scientific(mass_closure_limit, "%.0e"));
  for (const auto& [element, error] : b.element_relative_error)
    if (!(error <= mass_closure_limit))
      problems.push_back(element + " element balance " + where + " does not close: relative error " +
                         scientific(error, "%.2e") + " > " + scientific(mass_closure_limit, "%.0e"));
  if (!(b.energy_relative_error <= energy_closure_limit))
    problems.push_back("energy balance " + where + " does not close: relative error " +
                       scientific(b.energy_relative_error, "%.2e") + " > " +
                       scientific(energy_closure_limit, "%.0e"));
}

}  // namespace

std::vector<std::string> open_balances(const SolveResult& result) {
  std::vector<std::string> problems;
  check_closure("of the whole flowsheet", result.overall, problems);
  for (const auto& b : result.blocks) check_closure("of block '" + b.name + "'", b.balance, problems);
  return problems;
}

}  // namespace unchain::costs
