#include "flowsheet/balance.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "flowsheet/diagnostics.hpp"

namespace unchain {

namespace {

// Below this a flow is treated as nothing: a closure of 0 kg against 0 kg is
// exact, not 0/0.
constexpr double smallest_scale = std::numeric_limits<double>::min();

double relative_gap(double in, double out, double scale_floor) {
  const double scale = std::max({std::abs(in), std::abs(out), scale_floor, smallest_scale});
  return std::abs(out - in) / scale;
}

}  // namespace

BalanceClosure close_balance(const std::vector<const Stream*>& inlets, const std::vector<const Stream*>& outlets,
                             double heat_and_work_J, Warnings* warnings) {
  BalanceClosure out;
  ElementCounts elements_in, elements_out;
  for (const Stream* s : inlets) {
    out.mass_in_kg += to_si(s->total_mass());
    for (const auto& [symbol, mass] : s->element_masses()) elements_in[symbol] += mass;
    out.enthalpy_in_J += to_si(s->enthalpy(warnings));
  }
  for (const Stream* s : outlets) {
    out.mass_out_kg += to_si(s->total_mass());
    for (const auto& [symbol, mass] : s->element_masses()) elements_out[symbol] += mass;
    out.enthalpy_out_J += to_si(s->enthalpy(warnings));
  }
  out.heat_and_work_in_J = heat_and_work_J;
  out.mass_relative_error = relative_gap(out.mass_in_kg, out.mass_out_kg, 0.0);

  // Each element against its own flow, with a floor of 1e-15 of the total
  // mass: an element that appears at round-off level (1e-25 kg from a
  // subtraction) where none entered is not a broken balance.
  const double element_floor = 1e-15 * std::max(out.mass_in_kg, out.mass_out_kg);
  for (const auto& [symbol, mass] : elements_in) elements_out.try_emplace(symbol, 0.0);
  for (const auto& [symbol, mass] : elements_out) {
    const double in = elements_in.count(symbol) != 0 ? elements_in.at(symbol) : 0.0;
    if (in == 0.0 && mass == 0.0) continue;  // in the formulas of the case but not in these streams
    out.element_relative_error[symbol] = relative_gap(in, mass, element_floor);
  }

  const double imbalance = out.enthalpy_out_J - out.enthalpy_in_J - heat_and_work_J;
  const double scale = std::max({std::abs(out.enthalpy_in_J), std::abs(out.enthalpy_out_J), std::abs(heat_and_work_J),
                                 smallest_scale});
  out.energy_relative_error = std::abs(imbalance) / scale;
  return out;
}

}  // namespace unchain
