#pragma once
// Chemical elements and formulas.

#include <map>
#include <optional>
#include <string>
#include <string_view>

namespace unchain {

// Element counts of a formula (or of a polymer's repeat unit). Fractional
// counts are allowed for lumps defined by elemental analysis.
using ElementCounts = std::map<std::string, double>;

// IUPAC standard atomic weight in kg/mol for a symbol, or nothing when the
// element is not in the table. Conventional values for elements whose
// standard atomic weight is an interval. Source: IUPAC CIAAW, Standard
// Atomic Weights 2021 (Prohaska et al., Pure Appl. Chem. 94 (2022) 573).
std::optional<double> standard_atomic_weight(std::string_view symbol);

// Molar mass in kg/mol; throws std::invalid_argument for an unknown element.
double molar_mass_of(const ElementCounts& formula);

// "C8H8" style text for messages and reports.
std::string formula_text(const ElementCounts& formula);

}  // namespace unchain
