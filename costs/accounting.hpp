#pragma once
// Which streams matter for the figures per kilogram of monomer: the
// monomer product, the polymer fed, the solvent, the wastes (with their
// class) and the by-products that earn a credit. Read from the case's
// `accounting` section (docs/costing.md).

#include <optional>
#include <string>
#include <vector>

#include "flowsheet/case.hpp"

namespace unchain::costs {

enum class WasteClass { solid_residue, aqueous, vent_gas, distillation_bottoms, fore_cut, dust, other };
const char* waste_class_name(WasteClass c);

enum class CreditKind { fuel, chemical };

struct WasteStream {
  std::string stream;
  WasteClass waste_class = WasteClass::other;
  bool hazardous = false;  // solid or liquid wastes priced as hazardous
  std::string description;
};

struct ByproductStream {
  std::string stream;
  CreditKind credit = CreditKind::fuel;
  std::string component;  // for a chemical credit: the component sold
};

struct Accounting {
  std::optional<std::string> monomer_stream;
  std::string monomer_component;
  std::vector<std::string> polymer_feeds;   // feed streams whose polymer counts as "polymer fed"
  std::vector<std::string> solvents;        // component ids counted as solvent
  std::vector<std::string> solvent_makeup_feeds;  // feeds that bring fresh solvent (bought)
  std::vector<std::string> water_feeds;     // feeds of process water (bought)
  std::vector<WasteStream> wastes;
  std::vector<ByproductStream> byproducts;
};

Accounting read_accounting(const Case& c, DiagnosticList& diagnostics);

}  // namespace unchain::costs
