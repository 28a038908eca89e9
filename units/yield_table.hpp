#pragma once
// Product yields of pyrolysis given as a table against temperature.
//
// A case states mass fractions of the polymer converted at a few
// temperatures:
//   yield_table:
//     temperatures: ["450 degC", "500 degC", "550 degC"]
//     styrene: [0.62, 0.68, 0.71]
//     char: [0.05, 0.04, 0.03]
//     source: "..."            (optional)
// At each temperature the fractions must sum to 1 within 0.02 and are then
// normalized. Between table temperatures the yields are interpolated
// linearly (which keeps the sum at 1); outside, they are extrapolated
// linearly with a warning, and refused beyond 10 % of the table's span.

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "flowsheet/component_library.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain {
class MappingReader;
class Warnings;
}  // namespace unchain

namespace unchain::units {

inline constexpr double yield_sum_tolerance = 0.02;
inline constexpr double yield_extrapolation_limit = 0.10;  // of the temperature span

class YieldTable {
 public:
  // Checks and normalizes; throws std::invalid_argument describing what is
  // wrong (fewer than two temperatures, temperatures not increasing, a
  // product column of the wrong length, a negative fraction, a sum off 1 by
  // more than yield_sum_tolerance).
  YieldTable(std::vector<Temperature> temperatures, std::vector<std::string> products,
             std::vector<std::vector<double>> fractions, std::string source = {});

  [[nodiscard]] const std::vector<std::string>& products() const { return products_; }
  [[nodiscard]] const std::string& source() const { return source_; }
  [[nodiscard]] Temperature lowest() const { return kelvin(temperatures_K_.front()); }
  [[nodiscard]] Temperature highest() const { return kelvin(temperatures_K_.back()); }
  // True when T is within the table or within the extrapolation limit.
  [[nodiscard]] bool can_evaluate(Temperature T) const;

  // Yields at T in product order, summing to 1. Warns on extrapolation
  // (naming `who`); throws ModelError beyond the extrapolation limit. An
  // extrapolated fraction that falls below zero is set to zero and the rest
  // renormalized, with a warning.
  [[nodiscard]] std::vector<double> at(Temperature T, const std::string& who, Warnings& warnings) const;

 private:
  std::vector<double> temperatures_K_;
  std::vector<std::string> products_;
  std::vector<std::vector<double>> fractions_;  // [product][temperature], normalized per temperature
  std::string source_;
};

// Reads a table at `key` of a block mapping; every key but `temperatures`
// and `source` is a product, which must be in the component set. Empty when
// absent or wrong (errors reported to the reader's diagnostics).
std::optional<YieldTable> read_yield_table(MappingReader& parameters, std::string_view key,
                                           const ComponentSet& components);

}  // namespace unchain::units
