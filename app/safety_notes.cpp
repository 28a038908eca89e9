#include "app/safety_notes.hpp"

#include <algorithm>
#include <stdexcept>

namespace unchain::app {

const std::vector<SafetyNote>& general_safety_notes() {
  static const std::vector<SafetyNote> notes{
      {SafetyTopic::flammable_solvent, "Flammable solvent vapour",
       "Solvent-laden material gives off flammable vapour. Ovens and dryers that take it must be rated for "
       "flammable vapour and ventilated so that the vapour stays below 25 % of its lower flammability limit "
       "(LFL); never dry solvent-wet material in a domestic or unventilated oven. Keep ignition sources away "
       "from solvent handling and storage."},
      {SafetyTopic::hot_reactor, "Hot surfaces and inert atmosphere",
       "The pyrolysis reactor, its heaters and any glassware reach several hundred degrees Celsius: guard hot "
       "surfaces, use glassware rated for the temperature and thermal shock, and let equipment cool before "
       "opening it. Purge the reactor with an inert gas (nitrogen) before heating and keep it inert while hot, "
       "so that air never meets hot organic vapour."},
      {SafetyTopic::styrene, "Styrene vapour and self-polymerisation",
       "Styrene vapour is harmful to breathe: handle the crude oil and the monomer in a fume hood or with "
       "local exhaust ventilation. Styrene can polymerise by itself, releasing heat that can run away in a "
       "closed container: keep it inhibited (for example 4-tert-butylcatechol, which needs some dissolved "
       "oxygen to work), store it cool and dark, check the inhibitor level, and do not keep it for long."},
      {SafetyTopic::pyrolysis_products, "Pyrolysis gas and residue",
       "Pyrolysis gas is flammable and may contain carbon monoxide and aromatic vapours: vent it through a "
       "condenser to a flare, burner or safe outdoor point, never into the room. The char and heavy residue "
       "can be hot, sticky and self-heating: let them cool under inert gas before exposure to air and store "
       "them in closed metal containers."},
      {SafetyTopic::waste_disposal, "Waste disposal",
       "Wash water, spent solvent, still bottoms and char are wastes: collect them separately and dispose of "
       "them under local rules through a licensed waste handler; do not pour them down the drain."},
      {SafetyTopic::planning_aid, "A planning aid",
       "unchain is a planning aid, not a safety assessment; follow local codes, permits and licensed "
       "professionals before building or running any of this equipment."},
  };
  return notes;
}

const SafetyNote& safety_note(SafetyTopic topic) {
  for (const auto& note : general_safety_notes())
    if (note.topic == topic) return note;
  throw std::logic_error("safety note missing for a topic");
}

std::vector<SafetyTopic> safety_topics_for_block_types(const std::vector<std::string>& block_types) {
  auto has = [&](const char* type) {
    return std::find(block_types.begin(), block_types.end(), type) != block_types.end();
  };
  // Any distillation type (batch_distillation, a continuous column) handles
  // crude styrene.
  const bool distillation = std::any_of(block_types.begin(), block_types.end(), [](const std::string& type) {
    return type.find("distillation") != std::string::npos;
  });
  const bool solvent = has("solvent_densification") || has("solvent_recovery");
  const bool pyrolysis = has("pyrolysis");
  const bool styrene = pyrolysis || distillation;
  // Wash water, char and still bottoms are all wastes.
  const bool waste = has("washing") || pyrolysis || distillation;

  std::vector<SafetyTopic> topics;
  for (const auto& note : general_safety_notes()) {
    bool applies = false;
    switch (note.topic) {
      case SafetyTopic::flammable_solvent: applies = solvent; break;
      case SafetyTopic::hot_reactor: applies = pyrolysis; break;
      case SafetyTopic::styrene: applies = styrene; break;
      case SafetyTopic::pyrolysis_products: applies = pyrolysis; break;
      case SafetyTopic::waste_disposal: applies = waste; break;
      case SafetyTopic::planning_aid: applies = true; break;
    }
    if (applies) topics.push_back(note.topic);
  }
  return topics;
}

std::vector<std::string> CaseCautions::all() const {
  std::vector<std::string> out = from_blocks;
  out.insert(out.end(), general.begin(), general.end());
  return out;
}

CaseCautions collect_cautions(const std::vector<std::string>& block_types,
                              const std::vector<std::string>& block_cautions) {
  CaseCautions out;
  auto seen = [&](const std::string& text) {
    auto in = [&](const std::vector<std::string>& list) {
      return std::find(list.begin(), list.end(), text) != list.end();
    };
    return in(out.from_blocks) || in(out.general);
  };
  for (const auto& caution : block_cautions)
    if (!caution.empty() && !seen(caution)) out.from_blocks.push_back(caution);
  for (SafetyTopic topic : safety_topics_for_block_types(block_types)) {
    const std::string& text = safety_note(topic).text;
    if (!seen(text)) out.general.push_back(text);
  }
  return out;
}

}  // namespace unchain::app
