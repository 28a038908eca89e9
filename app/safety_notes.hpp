#pragma once
// The general safety cautions that reports and the README carry where they
// apply, and which of them apply to a flowsheet, chosen by the block types
// it contains. Blocks add their own specific cautions to their results;
// these are the general texts that sit beside them.

#include <string>
#include <vector>

namespace unchain::app {

enum class SafetyTopic {
  flammable_solvent,   // solvent vapour in ovens and dryers
  hot_reactor,         // hot surfaces, glassware, inert atmosphere
  styrene,             // vapour exposure and runaway self-polymerisation
  pyrolysis_products,  // pyrolysis gas and residue handling
  waste_disposal,      // wastewater, residues, spent solvent
  planning_aid,        // the model is not a safety assessment
};

struct SafetyNote {
  SafetyTopic topic;
  std::string title;  // a few words, for headings
  std::string text;   // one paragraph
};

// Every general note, in the order the README lists them; the planning-aid
// note is last.
const std::vector<SafetyNote>& general_safety_notes();

const SafetyNote& safety_note(SafetyTopic topic);

// The topics that apply to a flowsheet with the given block types (any
// order, repeats allowed), in the order of general_safety_notes(). The
// planning-aid note is always included, last.
std::vector<SafetyTopic> safety_topics_for_block_types(const std::vector<std::string>& block_types);

// The cautions of a case, for a report.
struct CaseCautions {
  std::vector<std::string> from_blocks;  // the blocks' own cautions, first occurrence kept
  std::vector<std::string> general;      // general notes for the block types, planning-aid note last
  // Both lists in one, blocks' first (the JSON `cautions` array).
  [[nodiscard]] std::vector<std::string> all() const;
};

CaseCautions collect_cautions(const std::vector<std::string>& block_types,
                              const std::vector<std::string>& block_cautions);

}  // namespace unchain::app
