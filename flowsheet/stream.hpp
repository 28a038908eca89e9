#pragma once
// A material stream: component amounts in each phase, temperature and
// pressure. Amounts are on the case's basis: kg per batch for a batch case,
// kg per hour for a continuous one (see Basis in case.hpp).

#include <Eigen/Core>

#include <optional>
#include <string>

#include "flowsheet/component_library.hpp"
#include "flowsheet/elements.hpp"
#include "flowsheet/quantity.hpp"

namespace unchain {

class Warnings;

enum class Phase { solid, liquid, vapour };
inline constexpr Phase all_phases[] = {Phase::solid, Phase::liquid, Phase::vapour};
const char* phase_name(Phase phase);

class Stream {
 public:
  Stream() = default;
  explicit Stream(const ComponentSet& components);

  [[nodiscard]] const ComponentSet& components() const { return *components_; }
  [[nodiscard]] bool has_components() const { return components_ != nullptr; }
  [[nodiscard]] std::size_t size() const { return static_cast<std::size_t>(solid_.size()); }

  // Component masses per phase, kg per basis.
  [[nodiscard]] const Eigen::VectorXd& phase_masses(Phase phase) const;
  Eigen::VectorXd& phase_masses(Phase phase);
  [[nodiscard]] Mass mass(Phase phase, std::size_t component) const;
  void set_mass(Phase phase, std::size_t component, Mass mass);
  void add_mass(Phase phase, std::size_t component, Mass mass);

  [[nodiscard]] Eigen::VectorXd component_masses() const;  // summed over phases, kg
  [[nodiscard]] Eigen::VectorXd component_moles() const;   // mol
  [[nodiscard]] Mass total_mass() const;
  [[nodiscard]] Mass phase_total(Phase phase) const;
  [[nodiscard]] Eigen::VectorXd mass_fractions() const;
  [[nodiscard]] Eigen::VectorXd mole_fractions() const;
  [[nodiscard]] Eigen::VectorXd phase_mole_fractions(Phase phase) const;
  // Mass of each element, kg per basis.
  [[nodiscard]] ElementCounts element_masses() const;
  [[nodiscard]] bool is_empty() const { return to_si(total_mass()) <= 0.0; }

  [[nodiscard]] Temperature temperature() const { return kelvin(temperature_K_); }
  void set_temperature(Temperature T) { temperature_K_ = in_kelvin(T); }
  [[nodiscard]] Pressure pressure() const { return pascal(pressure_Pa_); }
  void set_pressure(Pressure P) { pressure_Pa_ = to_si(P); }

  // Bulk density of the solid phase as charged (foam, granulate, flakes).
  [[nodiscard]] std::optional<Density> bulk_density() const;
  void set_bulk_density(std::optional<Density> density);

  // Enthalpy relative to the elements at 298.15 K, J per basis.
  [[nodiscard]] Energy enthalpy(Warnings* warnings = nullptr) const;
  // Volume of the condensed phases at the stream temperature (no excess
  // volume), and of the vapour as an ideal gas.
  [[nodiscard]] Volume condensed_volume(Warnings* warnings = nullptr) const;
  [[nodiscard]] Volume vapour_volume() const;

  // Adds another stream's contents (same component set) without changing
  // temperature or pressure; the caller sets those.
  void add_contents(const Stream& other);
  // The same stream scaled by a factor (fractions, runs).
  [[nodiscard]] Stream scaled(double factor) const;
  // Empties the stream, keeping components, temperature and pressure.
  void clear();
  // Moves every component into one phase (used by blocks that dictate phase).
  void collapse_into(Phase phase);

 private:
  const ComponentSet* components_ = nullptr;
  Eigen::VectorXd solid_, liquid_, vapour_;
  double temperature_K_ = reference_temperature_K;
  double pressure_Pa_ = standard_atmosphere_Pa;
  double bulk_density_ = 0.0;  // kg/m3, 0 = not given
};

// Enthalpy of a set of component masses in one phase at T, J.
Energy phase_enthalpy(const ComponentSet& components, const Eigen::VectorXd& masses_kg, Phase phase, Temperature T,
                      Warnings* warnings = nullptr);

}  // namespace unchain
