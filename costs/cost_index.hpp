#pragma once
// Escalating equipment costs between years by a plant cost index:
//   C_year2 = C_year1 * I_year2 / I_year1
// Built-in values are annual averages of the Chemical Engineering Plant
// Cost Index (CEPCI, 1957-59 = 100). A case may add or override years.

#include <map>
#include <optional>

namespace unchain::costs {

class CostIndex {
 public:
  // The built-in CEPCI annual averages.
  static CostIndex chemical_engineering_plant_cost_index();

  void set(int year, double value);
  [[nodiscard]] std::optional<double> value(int year) const;
  [[nodiscard]] int first_year() const;
  [[nodiscard]] int last_year() const;
  // Ratio I(to) / I(from); throws std::out_of_range naming the missing year.
  [[nodiscard]] double escalation(int from_year, int to_year) const;

 private:
  std::map<int, double> values_;
};

}  // namespace unchain::costs
