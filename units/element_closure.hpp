#pragma once
// Closing the element balance of a set of pyrolysis yields.
//
// Yields measured as mass fractions seldom carry exactly the polymer's C, H
// (and O) in their products. The closure changes the yields of a few chosen
// species (char for C, hydrogen for H, water for O, ...) by the least
// amount that makes every element balance exactly:
//   sum_j a_ej (y_j + d_j) = a_eP   for each element e,
// where a_ej is the mass fraction of element e in species j and P is the
// polymer. Only the chosen species change: A_s d_s = b (b = a_eP - sum_j
// a_ej y_j), solved with Eigen (complete orthogonal decomposition: exact
// for as many species as elements, minimum-norm for more). Since the
// element mass fractions of each species sum to 1, closing every element
// keeps the mass total too. Equations: docs/blocks-pyrolysis.md.

#include <Eigen/Core>

#include <map>
#include <string>
#include <vector>

#include "flowsheet/component_library.hpp"

namespace unchain::units {

struct ElementClosure {
  Eigen::VectorXd yields;         // closed yields, kg per kg of polymer converted, by component index
  Eigen::VectorXd adjustment;     // d_j, by component index (zero but for the closure species)
  double total_adjustment = 0.0;  // sum_j |d_j|, kg per kg of polymer converted
  std::map<std::string, double> imbalance_before;  // b_e, kg of element per kg converted (polymer less products)
  std::map<std::string, double> imbalance_after;   // the same after the closure (round-off)
};

// Closes the yields of `polymer` (indexed by component) with the species
// `adjust`. Throws ModelError, naming the element or species, when:
//   - an element of the polymer or the yields is in none of the adjust species,
//   - the closure needs a negative amount of a species,
//   - the adjustment sum_j |d_j| exceeds `limit` (kg per kg converted).
// A negative amount within 1e-12 of the basis (round-off) is set to zero.
ElementClosure close_element_balance(const ComponentSet& components, std::size_t polymer,
                                     const Eigen::VectorXd& yields, const std::vector<std::size_t>& adjust,
                                     double limit);

// Mass of each element in a set of component masses (kg of element per
// kg-basis of the masses).
std::map<std::string, double> element_masses_of(const ComponentSet& components, const Eigen::VectorXd& masses);

}  // namespace unchain::units
