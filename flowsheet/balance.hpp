#pragma once
// Mass, element and energy balances, per block and overall.

#include <map>
#include <string>
#include <vector>

#include "flowsheet/block_model.hpp"
#include "flowsheet/stream.hpp"

namespace unchain {

struct BalanceClosure {
  double mass_in_kg = 0.0;
  double mass_out_kg = 0.0;
  double mass_relative_error = 0.0;  // |out - in| / max(in, out, tiny)
  std::map<std::string, double> element_relative_error;  // C, H, O, N (and any other element present)
  double enthalpy_in_J = 0.0;
  double heat_and_work_in_J = 0.0;   // process heat plus work to streams
  double enthalpy_out_J = 0.0;
  // |H_out - H_in - Q - W| / max(|H_in|, |H_out|, |Q| + |W|, tiny)
  double energy_relative_error = 0.0;
};

// Closure over a set of inlets and outlets with the heat and work added.
BalanceClosure close_balance(const std::vector<const Stream*>& inlets, const std::vector<const Stream*>& outlets,
                             double heat_and_work_J, Warnings* warnings = nullptr);

}  // namespace unchain
