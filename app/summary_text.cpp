#include "app/summary_text.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <sstream>

namespace unchain::app {

std::string format_number(double value, int significant) {
  if (!std::isfinite(value)) return std::isnan(value) ? "nan" : (value > 0 ? "inf" : "-inf");
  if (value == 0.0) return "0";
  const double magnitude = std::fabs(value);
  if (magnitude >= 1e7 || magnitude < 1e-3) return fmt::format("{:.{}e}", value, std::max(0, significant - 1));
  const int exponent = static_cast<int>(std::floor(std::log10(magnitude)));
  const int decimals = std::clamp(significant - 1 - exponent, 0, 6);
  return fmt::format("{:.{}f}", value, decimals);
}

std::string format_fixed(double value, int decimals) {
  if (!std::isfinite(value)) return format_number(value);
  std::string text = fmt::format("{:.{}f}", value, decimals);
  // "-0.000" reads as a sign error; show it as zero.
  if (text.find_first_not_of("-0.") == std::string::npos && text.front() == '-') text.erase(0, 1);
  return text;
}

std::string format_celsius_brief(double kelvin) {
  std::string text = format_fixed(kelvin - 273.15, 1);
  if (text.size() > 2 && text.compare(text.size() - 2, 2, ".0") == 0) text.resize(text.size() - 2);
  return text;
}

std::string format_temperature_range(double low_K, double high_K) {
  auto whole = [](double x) { return std::fabs(x - std::round(x)) < 1e-9; };
  if (whole(low_K) && whole(high_K)) return format_fixed(low_K, 0) + " to " + format_fixed(high_K, 0) + " K";
  return format_celsius_brief(low_K) + " to " + format_celsius_brief(high_K) + " degC";
}

std::string format_relative_error(double value) {
  if (value == 0.0) return "0";
  return fmt::format("{:.1e}", value);
}

DisplayValue display_si_value(double value, const std::string& si_unit) {
  if (si_unit == "J") return {format_number(value / 3.6e6), "kWh"};
  if (si_unit == "W") return {format_number(value / 1e3), "kW"};
  if (si_unit == "s") return {format_number(value / 60.0), "min"};
  if (si_unit == "Pa") return {format_number(value / 1e3), "kPa"};
  if (si_unit == "kg/s") return {format_number(value * 3600.0), "kg/h"};
  if (si_unit == "m3/s") return {format_number(value * 3600.0), "m3/h"};
  if (si_unit == "J/kg") return {format_number(value / 3.6e6), "kWh/kg"};
  if (si_unit == "Pa^0.5") return {format_number(value / 1e3), "MPa^0.5"};
  return {format_number(value), si_unit};
}

std::string format_table(const std::vector<std::string>& headings, const std::vector<std::vector<std::string>>& rows,
                         const std::string& alignment, const std::string& indent) {
  std::vector<std::size_t> widths(headings.size(), 0);
  for (std::size_t i = 0; i < headings.size(); ++i) widths[i] = headings[i].size();
  for (const auto& row : rows)
    for (std::size_t i = 0; i < row.size() && i < widths.size(); ++i) widths[i] = std::max(widths[i], row[i].size());

  auto line = [&](const std::vector<std::string>& cells) {
    std::string out = indent;
    for (std::size_t i = 0; i < widths.size(); ++i) {
      const std::string& cell = i < cells.size() ? cells[i] : std::string();
      const std::string pad(widths[i] - std::min(widths[i], cell.size()), ' ');
      if (i > 0) out += "  ";
      const bool left = i < alignment.size() && alignment[i] == 'l';
      out += left ? cell + pad : pad + cell;
    }
    while (!out.empty() && out.back() == ' ') out.pop_back();
    return out + "\n";
  };
  std::string out = line(headings);
  std::size_t total = 0;
  for (std::size_t w : widths) total += w;
  total += widths.empty() ? 0 : 2 * (widths.size() - 1);
  out += indent + std::string(total, '-') + "\n";
  for (const auto& row : rows) out += line(row);
  return out;
}

namespace {

// Breaks a paragraph into lines of at most `width` characters, the first
// prefixed with `first`, the rest with `rest`.
std::string wrap(const std::string& text, const std::string& first, const std::string& rest, std::size_t width = 78) {
  std::istringstream words(text);
  std::string word, line = first, out;
  bool line_has_word = false;
  while (words >> word) {
    if (line_has_word && line.size() + 1 + word.size() > width) {
      out += line + "\n";
      line = rest;
      line_has_word = false;
    }
    if (line_has_word) line += ' ';
    line += word;
    line_has_word = true;
  }
  out += line + "\n";
  return out;
}

struct BasisUnits {
  std::string amount;  // "kg" or "kg/h"
  std::string energy;  // "kWh" or "kW"
};

BasisUnits basis_units(Basis basis) {
  if (basis == Basis::continuous) return {"kg/h", "kW"};
  return {"kg", "kWh"};
}

std::string endpoint(const Case& c, const std::optional<std::size_t>& block, const char* none) {
  if (!block) return none;
  return c.blocks[*block].name;
}

// The components worth a column: those reaching at least 1 % of the
// largest stream somewhere, at most six (so the table fits a wide
// terminal), in the case's component order.
std::vector<std::size_t> main_components(const Case& c, const SolveResult& result) {
  const std::size_t n = c.components ? c.components->size() : 0;
  std::vector<double> largest(n, 0.0);
  double largest_stream = 0.0;
  for (const auto& s : result.streams) {
    if (!s.has_components()) continue;
    const Eigen::VectorXd m = s.component_masses();
    for (std::size_t i = 0; i < n && i < static_cast<std::size_t>(m.size()); ++i)
      largest[i] = std::max(largest[i], m[static_cast<Eigen::Index>(i)]);
    largest_stream = std::max(largest_stream, to_si(s.total_mass()));
  }
  std::vector<std::size_t> chosen;
  for (std::size_t i = 0; i < n; ++i)
    if (largest[i] > 0.0 && largest[i] >= 0.01 * largest_stream) chosen.push_back(i);
  constexpr std::size_t max_columns = 6;
  if (chosen.size() > max_columns) {
    std::stable_sort(chosen.begin(), chosen.end(), [&](std::size_t a, std::size_t b) { return largest[a] > largest[b]; });
    chosen.resize(max_columns);
    std::sort(chosen.begin(), chosen.end());
  }
  return chosen;
}

std::string stream_table(const Case& c, const SolveResult& result) {
  const BasisUnits units = basis_units(c.basis);
  const std::vector<std::size_t> shown = main_components(c, result);
  std::vector<std::string> headings{"stream", "from", "to", "T degC", "P kPa", "total " + units.amount};
  for (std::size_t i : shown) headings.push_back((*c.components)[i].id + " " + units.amount);
  bool any_other = false;
  std::vector<std::vector<std::string>> rows;
  for (std::size_t s = 0; s < c.streams.size() && s < result.streams.size(); ++s) {
    const StreamInfo& info = c.streams[s];
    const Stream& stream = result.streams[s];
    std::vector<std::string> row{info.name, endpoint(c, info.source, "(feed)"),
                                 endpoint(c, info.destination, "(product)"),
                                 format_fixed(in_celsius(stream.temperature()), 1),
                                 format_fixed(to_si(stream.pressure()) / 1e3, 2),
                                 format_fixed(to_si(stream.total_mass()), 4)};
    double shown_mass = 0.0;
    if (stream.has_components()) {
      const Eigen::VectorXd m = stream.component_masses();
      for (std::size_t i : shown) {
        const double kg = m[static_cast<Eigen::Index>(i)];
        shown_mass += kg;
        row.push_back(kg == 0.0 ? "-" : format_fixed(kg, 4));
      }
    }
    const double other = to_si(stream.total_mass()) - shown_mass;
    if (other > 1e-12 * std::max(1.0, to_si(stream.total_mass()))) any_other = true;
    row.push_back(other > 0.0 ? format_fixed(other, 4) : "-");
    rows.push_back(std::move(row));
  }
  if (any_other) {
    headings.push_back("other " + units.amount);
  } else {
    for (auto& row : rows) row.pop_back();
  }
  return format_table(headings, rows, "lll");
}

std::string block_table(const Case& c, const SolveResult& result) {
  const BasisUnits units = basis_units(c.basis);
  const bool continuous = c.basis == Basis::continuous;
  std::vector<std::string> headings{"block", "type", "heat " + units.energy, "electricity " + units.energy,
                                    "cooling " + units.energy};
  if (!continuous) headings.push_back("duration min");
  std::vector<std::vector<std::string>> rows;
  for (const auto& b : result.blocks) {
    const BlockResources& r = b.resources;
    std::vector<std::string> row{b.name, b.type, format_fixed(r.heat_drawn_J / 3.6e6, 3),
                                 format_fixed(r.electricity_J / 3.6e6, 3), format_fixed(r.cooling_J / 3.6e6, 3)};
    if (!continuous) row.push_back(r.duration_s > 0.0 ? format_fixed(r.duration_s / 60.0, 1) : "-");
    rows.push_back(std::move(row));
  }
  return format_table(headings, rows, "ll");
}

std::string block_figures(const SolveResult& result) {
  std::string out;
  for (const auto& b : result.blocks) {
    if (b.resources.figures.empty()) continue;
    out += "  " + b.name + " (" + b.type + ")\n";
    std::vector<std::vector<std::string>> rows;
    for (const auto& f : b.resources.figures) {
      const DisplayValue v = display_si_value(f.value, f.unit);
      rows.push_back({f.key, v.number, v.unit, f.description});
    }
    out += format_table({"figure", "value", "unit", "description"}, rows, "lrll", "    ");
  }
  return out;
}

std::string worst_element(const BalanceClosure& b) {
  std::string name = "-";
  double worst = -1.0;
  for (const auto& [element, error] : b.element_relative_error) {
    if (error > worst) {
      worst = error;
      name = element + " " + format_relative_error(error);
    }
  }
  return name;
}

std::string balance_section(const SolveResult& result, Basis basis) {
  const BasisUnits units = basis_units(basis);
  const BalanceClosure& o = result.overall;
  std::string out;
  out += fmt::format("  mass    {:>9}  (in {} {u}, out {} {u})\n", format_relative_error(o.mass_relative_error),
                     format_number(o.mass_in_kg, 6), format_number(o.mass_out_kg, 6), fmt::arg("u", units.amount));
  out += fmt::format("  energy  {:>9}  (enthalpy in {} {u}, heat and work in {} {u}, enthalpy out {} {u})\n",
                     format_relative_error(o.energy_relative_error), format_number(o.enthalpy_in_J / 3.6e6, 6),
                     format_number(o.heat_and_work_in_J / 3.6e6, 6), format_number(o.enthalpy_out_J / 3.6e6, 6),
                     fmt::arg("u", units.energy));
  if (!o.element_relative_error.empty()) {
    std::string elements;
    for (const auto& [element, error] : o.element_relative_error) {
      if (!elements.empty()) elements += ", ";
      elements += element + " " + format_relative_error(error);
    }
    out += "  elements  " + elements + "\n";
  }
  std::vector<std::vector<std::string>> rows;
  for (const auto& b : result.blocks)
    rows.push_back({b.name, format_relative_error(b.balance.mass_relative_error),
                    format_relative_error(b.balance.energy_relative_error), worst_element(b.balance)});
  if (!rows.empty()) {
    out += "\n  per block (relative errors)\n";
    out += format_table({"block", "mass", "energy", "worst element"}, rows, "lrrl", "    ");
  }
  return out;
}

}  // namespace

std::string run_summary_text(const Case& c, const SolveResult& result, const CaseCautions& cautions,
                             const std::string& extra_sections) {
  std::string out;
  out += (c.title.empty() ? c.file : c.title) + "\n";
  out += std::string(std::min<std::size_t>(78, std::max<std::size_t>(1, (c.title.empty() ? c.file : c.title).size())),
                     '=') + "\n";
  if (!c.description.empty()) out += wrap(c.description, "", "");
  out += "case file: " + c.file + "\n";
  out += std::string("basis: ") + basis_name(c.basis) +
         (c.basis == Basis::batch ? " (amounts in kg per batch, energies in kWh per batch)\n"
                                  : " (amounts in kg per hour, energies as kW)\n");

  out += "\nConvergence\n";
  if (result.loops.empty()) {
    out += "  no recycle loops; blocks computed once in order\n";
  } else {
    out += fmt::format("  {} ({} iterations in total)\n", result.converged ? "converged" : "NOT converged",
                       result.iterations);
    for (const auto& loop : result.loops) {
      std::string tears, blocks;
      for (const auto& t : loop.tear_streams) tears += (tears.empty() ? "" : ", ") + t;
      for (const auto& b : loop.blocks) blocks += (blocks.empty() ? "" : ", ") + b;
      const std::string last = loop.residual_history.empty() ? "-" : format_relative_error(loop.residual_history.back());
      out += fmt::format("  loop [{}]: tear streams {}; {} iterations; last residual {}\n", blocks,
                         tears.empty() ? "-" : tears, loop.iterations, last);
    }
  }
  if (!result.calculation_order.empty()) {
    std::string order;
    for (const auto& b : result.calculation_order) order += (order.empty() ? "" : " -> ") + b;
    out += wrap(order, "  calculation order: ", "    ");
  }

  out += "\nStreams\n" + stream_table(c, result);
  out += "\nBlocks\n" + block_table(c, result);
  const std::string figures = block_figures(result);
  if (!figures.empty()) out += "\nBlock figures\n" + figures;
  out += "\nBalance closure (relative errors)\n" + balance_section(result, c.basis);
  out += extra_sections;

  if (!result.warnings.empty()) {
    out += "\nWarnings\n";
    for (const auto& w : result.warnings) out += wrap(w, "warning: ", "  ");
  }
  out += "\nCautions\n";
  if (!cautions.from_blocks.empty()) {
    out += "  from the blocks of this case:\n";
    for (const auto& text : cautions.from_blocks) out += wrap(text, "  - ", "    ");
    out += "  general, for the kinds of blocks present:\n";
  }
  for (const auto& text : cautions.general) out += wrap(text, "  - ", "    ");
  return out;
}

}  // namespace unchain::app
