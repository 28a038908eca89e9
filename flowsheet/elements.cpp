#include "flowsheet/elements.hpp"

#include <cmath>
#include <sstream>
#include <stdexcept>

namespace unchain {

std::optional<double> standard_atomic_weight(std::string_view symbol) {
  // g/mol. Conventional (abridged) values from IUPAC CIAAW 2021 for the
  // interval elements H, C, N, O, S, Cl, Br; others as tabulated.
  struct Entry {
    std::string_view symbol;
    double grams_per_mol;
  };
  static constexpr Entry table[] = {
      {"H", 1.008},    {"He", 4.002602}, {"C", 12.011},   {"N", 14.007},   {"O", 15.999},
      {"F", 18.998403162}, {"Ne", 20.1797}, {"Na", 22.98976928}, {"Si", 28.085}, {"P", 30.973761998},
      {"S", 32.06},    {"Cl", 35.45},    {"Ar", 39.95},   {"K", 39.0983},  {"Ca", 40.078},
      {"Br", 79.904},  {"Ti", 47.867},   {"Fe", 55.845},  {"Zn", 65.38},
  };
  for (const auto& e : table)
    if (e.symbol == symbol) return e.grams_per_mol * 1e-3;
  return std::nullopt;
}

double molar_mass_of(const ElementCounts& formula) {
  double total = 0.0;
  for (const auto& [symbol, count] : formula) {
    const auto weight = standard_atomic_weight(symbol);
    if (!weight) throw std::invalid_argument("unknown element '" + symbol + "'");
    total += *weight * count;
  }
  return total;
}

std::string formula_text(const ElementCounts& formula) {
  // Hill order: C first, then H, then the rest alphabetically.
  std::ostringstream out;
  auto put = [&](const std::string& symbol, double count) {
    out << symbol;
    if (count != 1.0) {
      if (count == std::floor(count)) out << static_cast<long long>(count);
      else out << count;
    }
  };
  const bool has_carbon = formula.count("C") != 0;
  if (has_carbon) put("C", formula.at("C"));
  if (has_carbon && formula.count("H")) put("H", formula.at("H"));
  for (const auto& [symbol, count] : formula) {
    if (has_carbon && (symbol == "C" || symbol == "H")) continue;
    put(symbol, count);
  }
  return out.str();
}

}  // namespace unchain
