#pragma once
// The component data: built-in (embedded at build time from
// data/components.yaml and data/binary_pairs.yaml) and extended or
// overridden by a case file.

#include <yaml-cpp/yaml.h>

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "flowsheet/component.hpp"
#include "flowsheet/diagnostics.hpp"

namespace unchain {

// NRTL (Renon and Prausnitz, AIChE J. 14 (1968) 135):
//   tau_ij = a_ij + b_ij / T,  G_ij = exp(-alpha tau_ij)
struct NrtlPair {
  std::string first, second;  // component ids
  double a12 = 0, a21 = 0;    // dimensionless
  double b12 = 0, b21 = 0;    // K
  double alpha = 0.3;
  TemperatureRange range;
  std::string source;
};

// Flory-Huggins interaction parameter of a polymer-solvent pair.
struct FloryHugginsPair {
  std::string polymer, solvent;
  double chi = 0.5;
  double temperature_K = 298.15;
  std::string source;
};

class ComponentLibrary {
 public:
  [[nodiscard]] const Component* find(std::string_view id) const;
  [[nodiscard]] const std::vector<Component>& components() const { return components_; }
  [[nodiscard]] std::vector<std::string> ids() const;
  [[nodiscard]] const std::vector<NrtlPair>& nrtl_pairs() const { return nrtl_; }
  [[nodiscard]] const std::vector<FloryHugginsPair>& flory_huggins_pairs() const { return flory_huggins_; }
  [[nodiscard]] const NrtlPair* find_nrtl(std::string_view a, std::string_view b) const;
  [[nodiscard]] const FloryHugginsPair* find_flory_huggins(std::string_view polymer, std::string_view solvent) const;

  // Adds or replaces components from a YAML list of component mappings
  // (schema: docs/component-data.md). Errors go to `diagnostics`.
  void load_components(const YAML::Node& list, const std::string& file, DiagnosticList& diagnostics);
  // Adds or replaces binary data from a mapping with keys activity_models
  // and flory_huggins.
  void load_binary_pairs(const YAML::Node& root, const std::string& file, DiagnosticList& diagnostics);

 private:
  std::vector<Component> components_;
  std::vector<NrtlPair> nrtl_;
  std::vector<FloryHugginsPair> flory_huggins_;

  void derive_polymer_formation_enthalpies(const std::string& file, DiagnosticList& diagnostics);
};

// The library built from the embedded data files. Parsed once, on first
// use, and immutable afterwards (safe to share between threads).
const ComponentLibrary& builtin_library();

// The NRTL pairs of a component set resolved, once, to positions in its
// liquid mixture (every component but polymers and solids), so that an
// activity coefficient evaluation compares no names (thermo/activity.cpp).
struct NrtlIndex {
  struct Pair {
    std::size_t pair = 0;            // position in ComponentSet::nrtl_pairs()
    std::size_t first = 0, second = 0;  // positions of its two components in `members`
  };
  std::vector<std::size_t> members;  // component indices of the liquid mixture, in set order
  std::vector<Pair> pairs;           // the pairs whose two components are both members, in pair order
  std::vector<std::size_t> paired;   // member positions that are in at least one pair, ascending
};

// The elements of a component set and each component's share of them,
// resolved once so that an element balance looks up no atomic weights
// (Stream::element_masses).
struct ElementTable {
  struct Share {
    std::size_t element = 0;       // position in `symbols`
    double kg_per_mol = 0.0;       // atom count x standard atomic weight
  };
  std::vector<std::string> symbols;             // every element of the set, in alphabetical order
  std::vector<std::vector<Share>> by_component; // one list per component, in set order
};

// The components a case uses, in a fixed order that indexes stream vectors.
class ComponentSet {
 public:
  ComponentSet() = default;
  ComponentSet(std::vector<Component> components, std::vector<NrtlPair> nrtl,
               std::vector<FloryHugginsPair> flory_huggins);

  [[nodiscard]] std::size_t size() const { return components_.size(); }
  [[nodiscard]] const Component& operator[](std::size_t i) const { return components_[i]; }
  [[nodiscard]] const std::vector<Component>& components() const { return components_; }
  [[nodiscard]] std::optional<std::size_t> index_of(std::string_view id) const;
  // Throws ModelError naming the id when the case does not use it.
  [[nodiscard]] std::size_t require(std::string_view id) const;
  [[nodiscard]] const std::vector<NrtlPair>& nrtl_pairs() const { return nrtl_; }
  [[nodiscard]] const NrtlIndex& nrtl_index() const { return nrtl_index_; }
  [[nodiscard]] const ElementTable& element_table() const { return element_table_; }
  [[nodiscard]] const FloryHugginsPair* find_flory_huggins(std::string_view polymer, std::string_view solvent) const;

 private:
  std::vector<Component> components_;
  std::vector<NrtlPair> nrtl_;
  std::vector<FloryHugginsPair> flory_huggins_;
  NrtlIndex nrtl_index_;  // derived from the two above in the constructor
  ElementTable element_table_;  // derived from the formulas in the constructor
};

// Builds the set of components `ids` from a library, with the binary data
// that concerns them. Unknown ids are reported with suggestions.
ComponentSet make_component_set(const ComponentLibrary& library, const std::vector<std::string>& ids,
                                const std::vector<SourceLocation>& where, DiagnosticList& diagnostics);

}  // namespace unchain
