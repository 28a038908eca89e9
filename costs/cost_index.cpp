#include "costs/cost_index.hpp"

#include <stdexcept>
#include <string>

namespace unchain::costs {

CostIndex CostIndex::chemical_engineering_plant_cost_index() {
  // CEPCI annual averages. Source: Chemical Engineering magazine, Plant Cost
  // Index annual values as reprinted in Towler & Sinnott, Chemical
  // Engineering Design, 2nd ed. (2012), Fig. 7.2, and later issues of the
  // magazine (from memory). Values after 2023 are left to the case.
  CostIndex index;
  const std::pair<int, double> table[] = {
      {2001, 394.3}, {2002, 395.6}, {2003, 402.0}, {2004, 444.2}, {2005, 468.2}, {2006, 499.6},
      {2007, 525.4}, {2008, 575.4}, {2009, 521.9}, {2010, 550.8}, {2011, 585.7}, {2012, 584.6},
      {2013, 567.3}, {2014, 576.1}, {2015, 556.8}, {2016, 541.7}, {2017, 567.5}, {2018, 603.1},
      {2019, 607.5}, {2020, 596.2}, {2021, 708.0}, {2022, 816.0}, {2023, 797.9},
  };
  for (const auto& [year, value] : table) index.set(year, value);
  return index;
}

void CostIndex::set(int year, double value) {
  if (!(value > 0.0)) throw std::invalid_argument("cost index for " + std::to_string(year) + " must be positive");
  values_[year] = value;
}

std::optional<double> CostIndex::value(int year) const {
  auto it = values_.find(year);
  if (it == values_.end()) return std::nullopt;
  return it->second;
}

int CostIndex::first_year() const { return values_.empty() ? 0 : values_.begin()->first; }
int CostIndex::last_year() const { return values_.empty() ? 0 : values_.rbegin()->first; }

double CostIndex::escalation(int from_year, int to_year) const {
  const auto from = value(from_year);
  const auto to = value(to_year);
  if (!from || !to)
    throw std::out_of_range("no cost index value for " + std::to_string(!from ? from_year : to_year) +
                            " (the built-in index covers " + std::to_string(first_year()) + " to " +
                            std::to_string(last_year()) + "; add it under capital.cost_index)");
  return *to / *from;
}

}  // namespace unchain::costs
