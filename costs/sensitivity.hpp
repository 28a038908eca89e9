#pragma once
// One-at-a-time sensitivity (the tornado chart) of a case's key figures
// (docs/uncertainty.md). The case's `sensitivity` section lists parameters
// (dotted paths, as for --set) with a low and a high value; each is set to
// its low and then its high value with every other input at the base case,
// and the swing of each output is |output(high) - output(low)|.

#include <optional>
#include <string>
#include <vector>

#include "costs/case_study.hpp"

namespace unchain::costs {

struct SensitivityParameter {
  std::string path;
  std::string label;        // the path when not given
  std::string low, high;    // override texts as written ("0.15 USD/kWh")
  SourceLocation where;
};

// Reads the case's `sensitivity` section; every problem (a missing or
// unparsable value, low and high of different dimensions, a path that names
// nothing in the case) is reported together in one InputError.
std::vector<SensitivityParameter> read_sensitivity_parameters(const PreparedCase& prepared);

// One bar of a tornado: an output at the parameter's low and high value.
struct TornadoBar {
  std::size_t parameter = 0;          // index into SensitivityResult::parameters
  std::optional<double> low_output;   // absent when the figure has no value there
  std::optional<double> high_output;
  double swing = 0;                   // |high - low|; 0 when either is absent
};

// The tornado of one output, bars sorted by swing, largest first (ties
// keep the order of the section).
struct Tornado {
  std::string key, label, unit;       // as in KeyFigure
  std::optional<double> base;
  std::vector<TornadoBar> bars;
};

struct SensitivityResult {
  std::vector<SensitivityParameter> parameters;
  CaseFigures base;
  std::vector<CaseFigures> low, high;   // every key figure, per parameter
  std::vector<Tornado> tornadoes;       // net_cost_per_kg_monomer, then npv (when the case has one)
};

// The outputs a tornado is drawn for, in order.
const std::vector<std::string>& tornado_outputs();

// Evaluates the base case and each parameter at its low and high value
// (on up to `threads` threads; 0 = every core). An evaluation that fails
// is an error naming the parameter and the value.
SensitivityResult run_sensitivity(const PreparedCase& prepared, const std::vector<SensitivityParameter>& parameters,
                                  unsigned threads = 0);

}  // namespace unchain::costs
