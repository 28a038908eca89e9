#pragma once
// What the batch and the continuous pyrolysis reactor share: the settings
// read from the case, the split of the heat into sensible, reaction and
// vaporization parts, the product streams made from a conversion and a set
// of closed yields, the purge gas, the outlets and the cautions. The block
// is registered in units/pyrolysis.cpp (batch runs) and computed on a
// continuous basis in units/pyrolysis_continuous.cpp.
// Equations, sources and ranges: docs/blocks-pyrolysis.md.

#include <Eigen/Core>

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "flowsheet/block_model.hpp"
#include "flowsheet/quantity.hpp"
#include "flowsheet/stream.hpp"
#include "units/block_helpers.hpp"
#include "units/element_closure.hpp"
#include "units/pyrolysis_kinetics.hpp"
#include "units/vessel_heating.hpp"
#include "units/yield_table.hpp"

namespace unchain::units {

// The usual range of pyrolysis for monomer recovery.
inline constexpr double pyrolysis_usual_low_C = 400.0;
inline constexpr double pyrolysis_usual_high_C = 600.0;
// A warning when more than this fraction of the polymer fed is moved by the
// element closure.
inline constexpr double pyrolysis_closure_warning_fraction = 0.01;

enum class YieldSource { kinetics, table };

struct PyrolysisSettings {
  std::size_t polymer = 0;
  bool continuous = false;  // basis: continuous (a stirred melt reactor) instead of batch runs
  Volume reactor_volume = from_si<Volume>(0.0);
  double fill_fraction = 0.5;
  std::optional<Density> feed_bulk_density;       // batch only
  std::optional<Density> melt_density;            // continuous: sets the melt holdup
  std::optional<Time> residence_time;             // continuous: given instead of holdup / feed rate
  Temperature reactor_temperature = celsius(500.0);
  Pressure pressure = pascal(standard_atmosphere_Pa);
  std::optional<VolumeFlow> inert_gas_flow;  // at 0 degC, 1 atm
  YieldSource yields = YieldSource::kinetics;
  KineticSet kinetics;
  std::vector<std::size_t> channel_products;  // component index of each kinetic channel
  std::optional<YieldTable> table;
  std::vector<std::size_t> table_products;    // component index of each table product
  std::optional<Time> hold_time;              // batch only
  std::optional<double> target_conversion;    // batch only
  bool integrate_heat_up = true;              // batch only
  std::vector<std::size_t> closure_species;
  double closure_limit = 0.05;
  std::optional<Temperature> residue_discharge_temperature;
  HeatSource heat_source = HeatSource::electric;
  double burner_efficiency = 1.0;
  Time cool_down_time = seconds(0.0);   // batch only
  Time turnaround_time = seconds(0.0);  // batch only
  VesselDesign vessel;
  bool valid = false;  // every parameter read without error
};

// The heat of a feed going to its products, along the path
//   feed (T_feed) -> feed (298.15 K) -> products, condensed (298.15 K)
//   -> products in their outlet phases (298.15 K) -> products (T_out):
// the four parts sum to H_products(T_out) - H_feed(T_feed) exactly.
struct HeatSplit {
  double sensible_feed_J = 0.0;      // H_feed(298.15) - H_feed(T_feed)
  double reaction_J = 0.0;           // condensed products less condensed feed, at 298.15 K
  double vaporization_J = 0.0;       // to the outlet phases at 298.15 K (products less feed)
  double sensible_products_J = 0.0;  // H_products(T_out) - H_products(298.15)
  [[nodiscard]] double total() const { return sensible_feed_J + reaction_J + vaporization_J + sensible_products_J; }
  [[nodiscard]] double sensible() const { return sensible_feed_J + sensible_products_J; }
};
HeatSplit split_heat(const Stream& feed, const std::vector<const Stream*>& products, Warnings& warnings);

// The solid and liquid contents of the feed, and its polymer in them.
// Throws ModelError (naming `who`) when the feed carries no polymer.
struct PyrolysisFeed {
  Eigen::VectorXd condensed;  // kg per basis, by component index
  double polymer_kg = 0.0;
  double charge_kg = 0.0;
};
PyrolysisFeed pyrolysis_feed(const PyrolysisSettings& settings, const ComponentSet& components, const Stream& feed,
                             const std::string& who);

// Warnings on the set-point (usual range, the kinetic set's range) and on a
// second polymer in the feed; the table's yields at the set-point (empty
// with kinetic yields).
std::vector<double> check_pyrolysis_conditions(const PyrolysisSettings& settings, const ComponentSet& components,
                                     const PyrolysisFeed& feed, const std::string& who, Warnings& warnings);

// The products of a feed at a conversion X with closed yields (kg per kg
// converted), before any purge gas: condensed-only species and the
// unconverted polymer to the residue, the rest to the vapour; both at the
// reactor temperature and pressure.
struct ProductStreams {
  Stream vapour;
  Stream residue;
};
ProductStreams pyrolysis_products(const PyrolysisSettings& settings, const ComponentSet& components,
                                  const Stream& feed, const PyrolysisFeed& charge, double conversion,
                                  const Eigen::VectorXd& closed_yields);

// The purge: either the inert_gas inlet, or nitrogen added to the vapour at
// inert_gas_flow (entering at 25 degC, the reference state).
struct PurgeSupply {
  std::optional<std::size_t> nitrogen;
  double flow_normal_m3_per_s = 0.0;  // inert_gas_flow at 0 degC, 1 atm
  bool added = false;                 // nitrogen added by inert_gas_flow
  double kg_per_s = 0.0;              // nitrogen added
  double heating_W = 0.0;             // that nitrogen from 25 degC to the reactor temperature
  double inlet_heating_J = 0.0;       // the inert_gas inlet to the reactor temperature, per basis
};
PurgeSupply purge_supply(const PyrolysisSettings& settings, const ComponentSet& components, const Stream* inert,
                         const std::string& who, Warnings& warnings);

// Fills the outlets: the products' vapour with the purge gas (the inlet's,
// or `purge_kg` of nitrogen) at the reactor temperature; the residue at its
// discharge temperature.
void fill_pyrolysis_outlets(const PyrolysisSettings& settings, const ProductStreams& products, const Stream* inert,
                            const PurgeSupply& purge, double purge_kg, Stream& vapour, Stream& residue);

// The element closure figures, scaled from kg per kg converted to kg per
// basis by `converted_kg`.
void add_closure_figures(const PyrolysisSettings& settings, const ComponentSet& components,
                         const ElementClosure& closure, double converted_kg, double closure_fraction,
                         BlockResources& resources);

// The safety cautions of a pyrolysis reactor; `vapour` is the vapour
// outlet (its flammable contents are named).
void add_pyrolysis_cautions(const PyrolysisSettings& settings, const Stream& vapour, BlockResources& resources);

}  // namespace unchain::units
