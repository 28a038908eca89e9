#pragma once
// Published purchased-cost correlations of the form
//   C_e = a + b S^n        (US Gulf Coast basis, carbon steel unless stated)
// with S the size parameter in the stated unit and a validity range.

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace unchain::costs {

struct CostCorrelation {
  std::string name;        // our id, e.g. "jacketed_agitated_reactor"
  std::string equipment_kind;  // matches EquipmentSize::kind
  std::string measure;     // matches EquipmentSize::measure
  double a = 0, b = 0, n = 1;
  double size_scale = 1.0; // S = SI size * size_scale (e.g. W -> MW)
  std::string size_unit;   // unit of S
  double low = 0, high = 0;  // range of S
  int basis_year = 2010;   // cost-index year of the correlation
  std::string currency = "USD";
  std::string source;

  [[nodiscard]] double cost(double size_SI) const;  // in the correlation's currency and year
  [[nodiscard]] bool in_range(double size_SI) const;
};

const std::vector<CostCorrelation>& published_correlations();
const CostCorrelation* find_correlation(std::string_view name);
// The default correlation for an equipment kind and measure, if any.
const CostCorrelation* default_correlation(std::string_view kind, std::string_view measure);

}  // namespace unchain::costs
