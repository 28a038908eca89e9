#pragma once
// The human-readable summary of a solved case, and the small text-layout
// helpers (numbers, aligned tables) that the commands share.

#include <string>
#include <vector>

#include "app/safety_notes.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::app {

// A number with about `significant` significant digits in fixed notation,
// switching to scientific notation for very large or very small values.
std::string format_number(double value, int significant = 4);
// A number with a fixed count of decimals (table columns line up).
std::string format_fixed(double value, int decimals);
// A temperature in K shown in degC to 0.1 K, without a trailing ".0"
// ("145", "144.9"): for validity ranges written in either unit.
std::string format_celsius_brief(double kelvin);
// A validity range "303 to 418 K" or "30 to 145 degC": in kelvin when
// both limits are whole kelvin (the data gave them in K), else in degC.
std::string format_temperature_range(double low_K, double high_K);
// A relative error: "3.1e-12", "0" for an exact zero.
std::string format_relative_error(double value);

// A value in an SI unit, converted to the unit a reader expects in a
// report (J -> kWh, W -> kW, s -> min, Pa -> kPa, kg/s -> kg/h,
// Pa^0.5 -> MPa^0.5); other
// units are shown unchanged. Returns number and unit text.
struct DisplayValue {
  std::string number;
  std::string unit;
};
DisplayValue display_si_value(double value, const std::string& si_unit);

// A plain text table: headings, a rule, rows. Columns are as wide as their
// widest cell. `alignment` has one letter per column, 'l' for left (names,
// units, text) or 'r' for right (numbers); columns beyond it are right-aligned.
std::string format_table(const std::vector<std::string>& headings, const std::vector<std::vector<std::string>>& rows,
                         const std::string& alignment, const std::string& indent = "  ");

// The summary printed by `unchain run`: case, basis, convergence, streams,
// blocks, block figures, balance closure, warnings and cautions.
// `extra_sections` (the costing, for instance) goes after the balances and
// before the warnings and cautions.
std::string run_summary_text(const Case& c, const SolveResult& result, const CaseCautions& cautions,
                             const std::string& extra_sections = {});

}  // namespace unchain::app
