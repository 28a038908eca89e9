#include "units/element_closure.hpp"

#include <Eigen/QR>

#include <cmath>
#include <set>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/elements.hpp"
#include "units/block_helpers.hpp"

namespace unchain::units {

namespace {

// Mass fraction of `element` in a component, from its formula.
double element_fraction(const Component& c, const std::string& element) {
  const auto it = c.formula.find(element);
  if (it == c.formula.end()) return 0.0;
  return it->second * *standard_atomic_weight(element) / c.molar_mass;
}

// A negative closed yield above this (kg per kg converted) is round-off.
constexpr double round_off = 1e-12;

std::string species_list(const ComponentSet& components, const std::vector<std::size_t>& adjust) {
  std::string out;
  for (std::size_t j : adjust) out += (out.empty() ? "" : ", ") + components[j].id;
  return "[" + out + "]";
}

}  // namespace

std::map<std::string, double> element_masses_of(const ComponentSet& components, const Eigen::VectorXd& masses) {
  std::map<std::string, double> out;
  for (std::size_t i = 0; i < components.size(); ++i) {
    const double m = masses[static_cast<Eigen::Index>(i)];
    if (m == 0.0) continue;
    for (const auto& [element, count] : components[i].formula) out[element] += m * element_fraction(components[i], element);
  }
  return out;
}

ElementClosure close_element_balance(const ComponentSet& components, std::size_t polymer,
                                     const Eigen::VectorXd& yields, const std::vector<std::size_t>& adjust,
                                     double limit) {
  const Component& P = components[polymer];
  // The elements to close: those of the polymer, of every product made and
  // of the closure species (an element made from nothing must vanish).
  std::set<std::string> elements;
  for (const auto& [e, n] : P.formula) elements.insert(e);
  for (std::size_t i = 0; i < components.size(); ++i)
    if (yields[static_cast<Eigen::Index>(i)] != 0.0)
      for (const auto& [e, n] : components[i].formula) elements.insert(e);
  for (std::size_t j : adjust)
    for (const auto& [e, n] : components[j].formula) elements.insert(e);

  const std::vector<std::string> rows(elements.begin(), elements.end());
  const auto n_rows = static_cast<Eigen::Index>(rows.size());
  const auto n_cols = static_cast<Eigen::Index>(adjust.size());
  Eigen::MatrixXd A = Eigen::MatrixXd::Zero(n_rows, n_cols);
  Eigen::VectorXd b(n_rows);
  ElementClosure out;
  const auto before = element_masses_of(components, yields);
  for (Eigen::Index r = 0; r < n_rows; ++r) {
    const std::string& e = rows[static_cast<std::size_t>(r)];
    const double made = before.count(e) != 0 ? before.at(e) : 0.0;
    b[r] = element_fraction(P, e) - made;
    out.imbalance_before[e] = b[r];
    for (Eigen::Index c = 0; c < n_cols; ++c) A(r, c) = element_fraction(components[adjust[static_cast<std::size_t>(c)]], e);
    if (A.row(r).isZero(0.0) && std::abs(b[r]) > round_off)
      throw ModelError("cannot close the " + e + " balance of the yields (off by " + format_number(b[r], 4) +
                       " kg per kg of " + P.id + " converted): none of the closure species " +
                       species_list(components, adjust) + " contains " + e +
                       " (expected a species with " + e + " in closure_species)");
  }

  Eigen::VectorXd d = Eigen::VectorXd::Zero(n_cols);
  if (n_cols > 0) d = Eigen::CompleteOrthogonalDecomposition<Eigen::MatrixXd>(A).solve(b);
  const Eigen::VectorXd residual = (n_cols > 0 ? Eigen::VectorXd(A * d - b) : Eigen::VectorXd(-b));
  Eigen::Index worst = 0;
  if (n_rows > 0 && residual.cwiseAbs().maxCoeff(&worst) > round_off)
    throw ModelError("cannot close the " + rows[static_cast<std::size_t>(worst)] + " balance of the yields with " +
                     species_list(components, adjust) + ": more elements (" + std::to_string(rows.size()) +
                     ") than independent closure species (expected one more species in closure_species, such as "
                     "water or a light gas that contains it)");

  out.yields = yields;
  out.adjustment = Eigen::VectorXd::Zero(yields.size());
  for (Eigen::Index c = 0; c < n_cols; ++c) {
    const std::size_t j = adjust[static_cast<std::size_t>(c)];
    const auto index = static_cast<Eigen::Index>(j);
    double closed = yields[index] + d[c];
    if (closed < 0.0) {
      if (closed < -round_off)
        throw ModelError("closing the element balance of the yields needs a negative amount of " + components[j].id +
                         " (" + format_number(closed, 4) + " kg per kg of " + P.id + " converted, from " +
                         format_number(yields[index], 4) + "): the yields carry more of its elements than the " +
                         "polymer (expected yields nearer the polymer's composition, or other closure species)");
      closed = 0.0;
    }
    out.adjustment[index] = closed - yields[index];
    out.yields[index] = closed;
    out.total_adjustment += std::abs(out.adjustment[index]);
  }
  if (out.total_adjustment > limit)
    throw ModelError("closing the element balance of the yields moves " + format_number(out.total_adjustment, 4) +
                     " kg per kg of " + P.id + " converted, more than the limit of " + format_number(limit, 4) +
                     " (expected yields that nearly close C and H, or a larger element_closure_limit)");

  const auto after = element_masses_of(components, out.yields);
  for (const std::string& e : rows) out.imbalance_after[e] = element_fraction(P, e) - (after.count(e) ? after.at(e) : 0.0);
  return out;
}

}  // namespace unchain::units
