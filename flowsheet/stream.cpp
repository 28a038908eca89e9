#include "flowsheet/stream.hpp"

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/pure_properties.hpp"

namespace unchain {

const char* phase_name(Phase phase) {
  switch (phase) {
    case Phase::solid: return "solid";
    case Phase::liquid: return "liquid";
    case Phase::vapour: return "vapour";
  }
  return "unknown";
}

Stream::Stream(const ComponentSet& components)
    : components_(&components),
      solid_(Eigen::VectorXd::Zero(static_cast<Eigen::Index>(components.size()))),
      liquid_(Eigen::VectorXd::Zero(static_cast<Eigen::Index>(components.size()))),
      vapour_(Eigen::VectorXd::Zero(static_cast<Eigen::Index>(components.size()))) {}

const Eigen::VectorXd& Stream::phase_masses(Phase phase) const {
  switch (phase) {
    case Phase::solid: return solid_;
    case Phase::liquid: return liquid_;
    case Phase::vapour: break;
  }
  return vapour_;
}

Eigen::VectorXd& Stream::phase_masses(Phase phase) {
  return const_cast<Eigen::VectorXd&>(static_cast<const Stream&>(*this).phase_masses(phase));
}

Mass Stream::mass(Phase phase, std::size_t component) const {
  return kilograms(phase_masses(phase)[static_cast<Eigen::Index>(component)]);
}

void Stream::set_mass(Phase phase, std::size_t component, Mass mass) {
  phase_masses(phase)[static_cast<Eigen::Index>(component)] = to_si(mass);
}

void Stream::add_mass(Phase phase, std::size_t component, Mass mass) {
  phase_masses(phase)[static_cast<Eigen::Index>(component)] += to_si(mass);
}

Eigen::VectorXd Stream::component_masses() const { return solid_ + liquid_ + vapour_; }

Eigen::VectorXd Stream::component_moles() const {
  Eigen::VectorXd moles = component_masses();
  for (Eigen::Index i = 0; i < moles.size(); ++i)
    moles[i] /= (*components_)[static_cast<std::size_t>(i)].molar_mass;
  return moles;
}

Mass Stream::total_mass() const { return kilograms(solid_.sum() + liquid_.sum() + vapour_.sum()); }

Mass Stream::phase_total(Phase phase) const { return kilograms(phase_masses(phase).sum()); }

Eigen::VectorXd Stream::mass_fractions() const {
  const double total = to_si(total_mass());
  Eigen::VectorXd w = component_masses();
  if (total > 0.0) w /= total;
  return w;
}

Eigen::VectorXd Stream::mole_fractions() const {
  Eigen::VectorXd n = component_moles();
  const double total = n.sum();
  if (total > 0.0) n /= total;
  return n;
}

Eigen::VectorXd Stream::phase_mole_fractions(Phase phase) const {
  Eigen::VectorXd n = phase_masses(phase);
  for (Eigen::Index i = 0; i < n.size(); ++i) n[i] /= (*components_)[static_cast<std::size_t>(i)].molar_mass;
  const double total = n.sum();
  if (total > 0.0) n /= total;
  return n;
}

ElementCounts Stream::element_masses() const {
  if (components_ == nullptr) return {};  // a default-constructed stream holds nothing
  const ElementTable& table = components_->element_table();
  std::vector<double> sums(table.symbols.size(), 0.0);
  const Eigen::VectorXd moles = component_moles();
  for (std::size_t i = 0; i < size(); ++i)
    for (const ElementTable::Share& share : table.by_component[i])
      sums[share.element] += moles[static_cast<Eigen::Index>(i)] * share.kg_per_mol;
  ElementCounts out;
  for (std::size_t e = 0; e < sums.size(); ++e) out.emplace_hint(out.end(), table.symbols[e], sums[e]);
  return out;
}

std::optional<Density> Stream::bulk_density() const {
  if (bulk_density_ <= 0.0) return std::nullopt;
  return from_si<Density>(bulk_density_);
}

void Stream::set_bulk_density(std::optional<Density> density) { bulk_density_ = density ? to_si(*density) : 0.0; }

Energy phase_enthalpy(const ComponentSet& components, const Eigen::VectorXd& masses_kg, Phase phase, Temperature T,
                      Warnings* warnings) {
  double total = 0.0;
  for (std::size_t i = 0; i < components.size(); ++i) {
    const double m = masses_kg[static_cast<Eigen::Index>(i)];
    if (m == 0.0) continue;
    const Component& c = components[i];
    const double moles = m / c.molar_mass;
    const MolarEnergy h = phase == Phase::vapour ? vapour_molar_enthalpy(c, T, warnings)
                                                 : condensed_molar_enthalpy(c, T, warnings);
    total += moles * to_si(h);
  }
  return joules(total);
}

Energy Stream::enthalpy(Warnings* warnings) const {
  if (components_ == nullptr) return joules(0.0);
  const Temperature T = temperature();
  return phase_enthalpy(*components_, solid_, Phase::solid, T, warnings) +
         phase_enthalpy(*components_, liquid_, Phase::liquid, T, warnings) +
         phase_enthalpy(*components_, vapour_, Phase::vapour, T, warnings);
}

Volume Stream::condensed_volume(Warnings* warnings) const {
  double volume = 0.0;
  const Eigen::VectorXd condensed = solid_ + liquid_;
  for (std::size_t i = 0; i < size(); ++i) {
    const double m = condensed[static_cast<Eigen::Index>(i)];
    if (m == 0.0) continue;
    const Component& c = (*components_)[i];
    if (c.kind == ComponentKind::gas) continue;  // dissolved gas: no volume of its own
    volume += m / to_si(condensed_density(c, temperature(), warnings));
  }
  return from_si<Volume>(volume);
}

Volume Stream::vapour_volume() const {
  double moles = 0.0;
  for (std::size_t i = 0; i < size(); ++i)
    moles += vapour_[static_cast<Eigen::Index>(i)] / (*components_)[i].molar_mass;
  return from_si<Volume>(moles * gas_constant_J_per_mol_K * temperature_K_ / pressure_Pa_);
}

void Stream::add_contents(const Stream& other) {
  if (components_ == nullptr) *this = Stream(other.components());
  solid_ += other.solid_;
  liquid_ += other.liquid_;
  vapour_ += other.vapour_;
}

Stream Stream::scaled(double factor) const {
  Stream out = *this;
  out.solid_ *= factor;
  out.liquid_ *= factor;
  out.vapour_ *= factor;
  return out;
}

void Stream::clear() {
  solid_.setZero();
  liquid_.setZero();
  vapour_.setZero();
}

void Stream::collapse_into(Phase phase) {
  const Eigen::VectorXd all = component_masses();
  clear();
  phase_masses(phase) = all;
}

}  // namespace unchain
