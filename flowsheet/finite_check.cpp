#include "flowsheet/finite_check.hpp"

#include <cmath>

namespace unchain {

namespace {

// Names a stream by where it comes from, since that block produced the value:
// "block 'still': outlet 'vapour' (stream 'styrene_vapour')", or "feed 'foam'".
std::string stream_owner(const Case& c, std::size_t index) {
  const std::string name = index < c.streams.size() ? c.streams[index].name : "#" + std::to_string(index);
  if (index < c.streams.size()) {
    const StreamInfo& info = c.streams[index];
    if (info.source && *info.source < c.blocks.size()) {
      const std::string& block = c.blocks[*info.source].name;
      if (info.source_role == name) return "block '" + block + "': outlet '" + name + "'";
      return "block '" + block + "': outlet '" + info.source_role + "' (stream '" + name + "')";
    }
  }
  return "feed '" + name + "'";
}

class Collector {
 public:
  explicit Collector(std::vector<std::string>& out) : out_(out) {}
  void check(double value, const std::string& owner, const std::string& what) {
    if (!std::isfinite(value)) out_.push_back(owner + " " + what + " is not finite");
  }

 private:
  std::vector<std::string>& out_;
};

void check_stream(const Case& c, std::size_t index, const Stream& s, Collector& found) {
  const std::string owner = stream_owner(c, index);
  found.check(in_kelvin(s.temperature()), owner, "temperature");
  found.check(to_si(s.pressure()), owner, "pressure");
  if (auto density = s.bulk_density()) found.check(to_si(*density), owner, "bulk density");
  if (!s.has_components()) return;
  const ComponentSet& components = s.components();
  bool amounts_finite = true;
  for (Phase phase : all_phases) {
    const Eigen::VectorXd& masses = s.phase_masses(phase);
    for (Eigen::Index i = 0; i < masses.size(); ++i) {
      if (std::isfinite(masses[i])) continue;
      amounts_finite = false;
      const std::string component =
          static_cast<std::size_t>(i) < components.size() ? components[static_cast<std::size_t>(i)].id : "#" + std::to_string(i);
      found.check(masses[i], owner, std::string("amount of ") + component + " (" + phase_name(phase) + ")");
    }
  }
  // The enthalpy of non-finite amounts says nothing new; only a finite
  // stream whose enthalpy is not finite is a separate finding.
  if (amounts_finite && std::isfinite(in_kelvin(s.temperature()))) {
    Warnings ignored;  // the solve has already warned about ranges
    found.check(to_si(s.enthalpy(&ignored)), owner, "enthalpy");
  }
}

void check_balance(const BalanceClosure& b, const std::string& owner, Collector& found) {
  found.check(b.mass_in_kg, owner, "mass in");
  found.check(b.mass_out_kg, owner, "mass out");
  found.check(b.mass_relative_error, owner, "mass balance error");
  for (const auto& [element, error] : b.element_relative_error) found.check(error, owner, element + " balance error");
  found.check(b.enthalpy_in_J, owner, "enthalpy in");
  found.check(b.heat_and_work_in_J, owner, "heat and work in");
  found.check(b.enthalpy_out_J, owner, "enthalpy out");
  found.check(b.energy_relative_error, owner, "energy balance error");
}

void check_block(const BlockResult& block, Collector& found) {
  const std::string owner = "block '" + block.name + "':";
  const BlockResources& r = block.resources;
  found.check(r.process_heat_J, owner, "process heat");
  found.check(r.work_to_streams_J, owner, "work to streams");
  found.check(r.heat_drawn_J, owner, "heat drawn");
  found.check(r.electricity_J, owner, "electricity");
  found.check(r.cooling_J, owner, "cooling");
  found.check(r.duration_s, owner, "duration");
  for (const auto& m : r.materials) found.check(m.amount, owner, "material '" + m.name + "' amount");
  for (const auto& e : r.equipment) found.check(e.size, owner, "equipment '" + e.item + "' " + e.measure);
  for (const auto& f : r.figures) found.check(f.value, owner, "figure '" + f.key + "'");
  check_balance(block.balance, owner, found);
}

}  // namespace

std::vector<std::string> find_non_finite_values(const Case& c, const SolveResult& result) {
  std::vector<std::string> messages;
  Collector found(messages);
  for (std::size_t i = 0; i < result.streams.size(); ++i) check_stream(c, i, result.streams[i], found);
  for (const auto& block : result.blocks) check_block(block, found);
  check_balance(result.overall, "the overall balance:", found);
  for (std::size_t l = 0; l < result.loops.size(); ++l)
    for (double r : result.loops[l].residual_history)
      if (!std::isfinite(r)) {
        messages.push_back("recycle loop " + std::to_string(l + 1) + ": a residual of the solve is not finite");
        break;
      }
  return messages;
}

}  // namespace unchain
