#include "units/batch_distillation.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <memory>
#include <optional>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/thermo/phase_equilibrium.hpp"
#include "flowsheet/unit_parser.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_helpers.hpp"
#include "units/block_registry.hpp"
#include "units/column_stages.hpp"
#include "units/vessel_heating.hpp"

namespace unchain::units {

namespace {

using Index = Eigen::Index;
using MolarFlow = decltype(AmountOfSubstance{} / Time{});

// Hot styrene polymerises by itself (thermal initiation) at a rate that
// grows quickly above about 100-120 degC; a pot above this is flagged.
// Source: common practice (styrene handling guides of the producers).
constexpr double styrene_pot_limit_K = 393.15;
// A still is charged to at most about two thirds of its volume so that it
// can boil without foaming over. Source: common practice.
constexpr double still_fill_fraction = 2.0 / 3.0;
// Below this the column is taken to run under vacuum (glassware cautions).
constexpr double vacuum_below_Pa = 0.9 * standard_atmosphere_Pa;

struct BoilUpRate {
  bool molar = false;
  double rate = 0.0;  // kg/s or mol/s
};

struct TargetSpec {
  std::size_t component = 0;
  std::optional<double> purity;  // mass fraction
  std::optional<std::string> cut;
};

struct StillSpec {
  int stages = 0;
  double reflux_ratio = 0.0;
  std::optional<Pressure> pressure;
  std::vector<CutTarget> cuts;
  int steps_per_cut = 200;
  double minimum_residue_fraction = 0.05;
  std::optional<Temperature> maximum_still_temperature;
  std::optional<Temperature> distillate_temperature;
  // How the boiling is driven, one of three: a boil-up rate; a constant
  // net heat into the pot (no wall loss); or a heater on a vessel whose
  // heat-up and wall loss the shared vessel model gives.
  std::optional<BoilUpRate> boil_up;
  std::optional<Power> reboiler_power;
  std::optional<VesselDesign> vessel;
  HeatSupply supply;
  std::optional<TargetSpec> target;
};

// A monomer that polymerises by itself when hot: one named as the monomer
// of a polymer in the case, or one of the monomers this project handles.
bool is_self_polymerising(const ComponentSet& components, const Component& c) {
  if (c.id == "styrene" || c.id == "methyl_methacrylate") return true;
  for (const auto& other : components.components())
    if (other.polymer && other.polymer->monomer == c.id) return true;
  return false;
}

// What it would take to bring the target component to its purity in its cut.
struct TargetReport {
  std::size_t cut = 0;
  double purity = 0.0;                       // mass fraction in the cut
  std::optional<std::size_t> main_impurity;  // the largest other component in the cut
  bool main_impurity_is_lighter = false;
  std::optional<std::size_t> heavier_impurity;
  double relative_volatility = 0.0;                  // target over the heavier impurity, mean of still and top
  std::optional<double> minimum_stages_above_still;  // Fenske, total reflux
  // Reflux ratio at the given stages with which the whole run, cuts as
  // defined, brings the cut to the target purity; +inf when not even the
  // highest ratio searched does.
  std::optional<double> reflux_needed;
  // Why the reflux search stopped without an answer (the column model could
  // not settle at a high reflux ratio), if it did.
  std::string search_failure;
};

// A component's residue below this fraction of its charge is rounding.
constexpr double residue_dust_fraction = 1e-12;

// The highest reflux ratio the search for the target purity tries.
// Beyond about 50 a reflux ratio is impractical for a lab or pilot still (common
// practice), and every trial re-runs the whole batch, so the search stops there.
constexpr double highest_reflux_searched = 64.0;

class BatchDistillation final : public BlockModel {
 public:
  explicit BatchDistillation(StillSpec spec) : spec_(std::move(spec)) {}

  [[nodiscard]] std::vector<PortSpec> inlet_ports() const override {
    return {single_port("feed", "the liquid charge of the still")};
  }
  [[nodiscard]] std::vector<PortSpec> outlet_ports() const override {
    return {list_port("cuts", "one stream per cut, in the order the cuts are defined"),
            single_port("residue", "what stays in the still pot")};
  }

  void compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const override;

 private:
  StillSpec spec_;

  [[nodiscard]] TargetReport analyse_target(
      const KValueModel& model, const BatchStillResult& still, const Eigen::VectorXd& M,
      const std::function<BatchStillResult(double reflux_ratio, int steps_per_cut)>& run_at) const;
};

// ---- the energy bookkeeping -----------------------------------------------------

struct StillEnergy {
  double reboiler_J = 0.0;
  double condenser_J = 0.0;
  double heat_up_J = 0.0;       // charge from feed state to its bubble point
  double vapour_mass_kg = 0.0;  // boil-up, summed
  double vapour_moles = 0.0;
  struct Step {
    double duty_J = 0.0;               // reboiler duty of the step
    double still_temperature_K = 0.0;  // mean over the step
    double still_temperature_rise_K = 0.0;
    double vapour_mass_kg = 0.0;
    double vapour_moles = 0.0;
  };
  std::vector<Step> steps;
};

// Balances around the still with its column (no holdup) and around the
// condenser, step by step:
//   Q_reb,k  = dH_still,k + (R+1) H_V(packet, T_head) - R H_L(packet, T_bub)
//   Q_cond,k = (R+1) [H_V(packet, T_head) - H_L(packet, T_bub)]
//              + H_L(packet, T_bub) - H_L(packet, T_receiver)
// so Q_reb - Q_cond = dH_still + H_L(packet, T_receiver) for every step and
// the block closes: process heat = H_out - H_in. The total reboiler duty is
// taken from the end states directly so that rounding cannot accumulate.
StillEnergy still_energy(const ComponentSet& components, const Stream& feed, const Eigen::VectorXd& volatile_kg,
                         const Eigen::VectorXd& gas_kg, const Stream& nonvolatile, const BatchStillResult& still,
                         const Eigen::VectorXd& M, double R, Temperature T_receiver, const Stream& residue,
                         Warnings& warnings) {
  auto pot_enthalpy = [&](const Eigen::VectorXd& kg, double T_K) {
    Stream heavy = nonvolatile;
    heavy.set_temperature(kelvin(T_K));
    return to_si(phase_enthalpy(components, kg, Phase::liquid, kelvin(T_K))) + to_si(heavy.enthalpy());
  };
  StillEnergy e;
  const double T_boil = in_kelvin(still.initial_column.still_temperature);
  const double H_in = to_si(feed.enthalpy(&warnings));
  const double H_gas_boil = to_si(phase_enthalpy(components, gas_kg, Phase::vapour, kelvin(T_boil)));
  e.heat_up_J = pot_enthalpy(volatile_kg, T_boil) + H_gas_boil - H_in;

  double boil_terms = 0.0;
  Eigen::VectorXd still_kg = volatile_kg;
  double T_prev = T_boil;
  double H_prev = pot_enthalpy(still_kg, T_prev);
  for (const auto& packet : still.packets) {
    const Eigen::VectorXd kg = packet.moles.cwiseProduct(M);
    const double Hv = to_si(phase_enthalpy(components, kg, Phase::vapour, packet.head_temperature));
    const double Hl_bubble = to_si(phase_enthalpy(components, kg, Phase::liquid, packet.condensate_temperature));
    const double Hl_receiver = to_si(phase_enthalpy(components, kg, Phase::liquid, T_receiver));
    const double column_terms = (R + 1.0) * Hv - R * Hl_bubble;
    boil_terms += column_terms;
    e.condenser_J += (R + 1.0) * (Hv - Hl_bubble) + (Hl_bubble - Hl_receiver);

    still_kg = (still_kg - kg).cwiseMax(0.0);
    const double T_after = in_kelvin(packet.still_temperature);
    const double H_after = pot_enthalpy(still_kg, T_after);
    StillEnergy::Step step;
    step.duty_J = H_after - H_prev + column_terms;
    step.still_temperature_K = 0.5 * (T_prev + T_after);
    step.still_temperature_rise_K = T_after - T_prev;
    step.vapour_mass_kg = (R + 1.0) * kg.sum();
    step.vapour_moles = (R + 1.0) * packet.moles.sum();
    e.vapour_mass_kg += step.vapour_mass_kg;
    e.vapour_moles += step.vapour_moles;
    e.steps.push_back(step);
    H_prev = H_after;
    T_prev = T_after;
  }
  // Dissolved permanent gas leaves the pot as the charge comes to the boil
  // and is cooled in the condenser to the receiver temperature.
  e.condenser_J += H_gas_boil - to_si(phase_enthalpy(components, gas_kg, Phase::vapour, T_receiver));
  e.reboiler_J = to_si(residue.enthalpy(&warnings)) + H_gas_boil + boil_terms - H_in;
  return e;
}

// ---- timing -------------------------------------------------------------------

struct StillTiming {
  double heat_up_s = 0.0;
  double boiling_s = 0.0;
  double wall_loss_J = 0.0;
  double vessel_heat_J = 0.0;
  double heater_power_W = 0.0;  // rating, or the mean reboiler power with a boil-up rate
};

StillTiming still_timing(const StillSpec& spec, const StillEnergy& energy, Temperature T_feed, Temperature T_boil,
                         Temperature ambient, const std::string& block) {
  StillTiming t;
  const double boiling_duty = energy.reboiler_J - energy.heat_up_J;
  if (spec.boil_up) {
    // The boil-up rate fixes the boiling time; the heat-up is taken at the
    // mean reboiler power of the boiling.
    t.boiling_s =
        spec.boil_up->molar ? energy.vapour_moles / spec.boil_up->rate : energy.vapour_mass_kg / spec.boil_up->rate;
    t.heater_power_W = t.boiling_s > 0.0 ? boiling_duty / t.boiling_s : 0.0;
    if (energy.heat_up_J > 0.0 && t.heater_power_W > 0.0) t.heat_up_s = energy.heat_up_J / t.heater_power_W;
    return t;
  }
  if (spec.reboiler_power) {
    t.heater_power_W = to_si(*spec.reboiler_power);
    t.heat_up_s = std::max(energy.heat_up_J, 0.0) / t.heater_power_W;
    t.boiling_s = std::max(boiling_duty, 0.0) / t.heater_power_W;
    return t;
  }
  const VesselDesign& v = *spec.vessel;
  const double P = to_si(v.heater_power);
  const double UA = to_si(v.loss_conductance());
  const double C_vessel = to_si(v.vessel_heat_capacity);
  const double T0 = in_kelvin(T_feed), Tb = in_kelvin(T_boil), Ta = in_kelvin(ambient);
  t.heater_power_W = P;
  if (Tb > T0) {
    const double C_charge = std::max(energy.heat_up_J, 0.0) / (Tb - T0);
    const HeatCapacity C = from_si<HeatCapacity>(C_charge + C_vessel);
    t.heat_up_s = to_si(lumped_heat_up_time(C, v.heater_power, v.loss_conductance(), T_feed, T_boil, ambient));
    t.vessel_heat_J = C_vessel * (Tb - T0);
    t.wall_loss_J = P * t.heat_up_s - (C_charge + C_vessel) * (Tb - T0);
  }
  // Boiling: the heater covers the step's duty, the wall's share of the
  // rising pot temperature and the wall loss at the pot temperature.
  for (const auto& step : energy.steps) {
    const double net = P - UA * (step.still_temperature_K - Ta);
    if (!(net > 0.0)) {
      std::ostringstream message;
      message << "batch still '" << block << "': the heater (" << format_number(P)
              << " W) cannot keep the pot boiling at " << format_number(step.still_temperature_K - 273.15, 4)
              << " degC against the wall loss of " << format_number(UA * (step.still_temperature_K - Ta))
              << " W; fit a larger heater or insulate the still";
      throw ModelError(message.str());
    }
    const double vessel_share = C_vessel * std::max(step.still_temperature_rise_K, 0.0);
    const double dt = std::max(step.duty_J + vessel_share, 0.0) / net;
    t.boiling_s += dt;
    t.vessel_heat_J += vessel_share;
    t.wall_loss_J += UA * (step.still_temperature_K - Ta) * dt;
  }
  return t;
}

// ---- compute ------------------------------------------------------------------

void BatchDistillation::compute(const BlockContext& context, const BlockPorts& ports, BlockResources& resources) const {
  const Stream& feed = ports.inlet("feed");
  const auto& cut_streams = ports.outlets("cuts");
  const std::string& block = context.block_name;
  if (cut_streams.size() != spec_.cuts.size())
    throw ModelError("batch still '" + block + "' defines " + std::to_string(spec_.cuts.size()) + " cuts but " +
                     std::to_string(cut_streams.size()) + " streams are connected as 'cuts'");
  const ComponentSet& components = context.components;
  const std::size_t n = components.size();
  const auto size = static_cast<Index>(n);
  const Pressure P = spec_.pressure ? *spec_.pressure : feed.pressure();
  const Temperature T_receiver = spec_.distillate_temperature.value_or(context.ambient_temperature);
  const double R = spec_.reflux_ratio;
  if (feed.is_empty()) {  // a tear stream on the first pass: nothing to distil
    for (Stream* out : cut_streams) *out = empty_like(feed, T_receiver, P);
    ports.outlet("residue") = empty_like(feed, feed.temperature(), P);
    return;
  }

  // The charge: volatile liquids are distilled; permanent gases vent as the
  // pot comes to the boil; polymers and solids stay in the pot.
  const Eigen::VectorXd feed_kg = feed.component_masses();
  Eigen::VectorXd M(size), volatile_kg = Eigen::VectorXd::Zero(size), gas_kg = Eigen::VectorXd::Zero(size);
  Stream nonvolatile(components);
  for (std::size_t i = 0; i < n; ++i) {
    const auto k = static_cast<Index>(i);
    const Component& c = components[i];
    M[k] = c.molar_mass;
    switch (c.kind) {
      case ComponentKind::volatile_liquid:
        volatile_kg[k] = feed_kg[k];
        break;
      case ComponentKind::gas:
        gas_kg[k] = feed_kg[k];
        break;
      case ComponentKind::polymer:
      case ComponentKind::solid:
        nonvolatile.phase_masses(Phase::solid)[k] = feed.phase_masses(Phase::solid)[k];
        nonvolatile.phase_masses(Phase::liquid)[k] = feed.phase_masses(Phase::liquid)[k];
        break;
    }
  }
  if (!(volatile_kg.sum() > 0.0)) throw ModelError("batch still '" + block + "': the charge holds no volatile liquid");
  if (gas_kg.sum() > 0.0)
    context.warnings.add("batch still '" + block +
                         "': dissolved permanent gas in the charge vents through the condenser as the pot comes to the "
                         "boil; it is reported with the first cut as vapour");
  if (context.basis == Basis::continuous)
    context.warnings.add("batch still '" + block +
                         "' on a continuous basis: its amounts, duties and times are per hour of feed; the still works "
                         "that feed in batches");
  if (spec_.stages == 0 && R > 0.0)
    context.warnings.add("batch still '" + block +
                         "': reflux with no stages above the still does not sharpen the split (the condensate returns "
                         "to the pot); it only adds boil-up");

  ModifiedRaoultKValues model(components, P);
  const Eigen::VectorXd charge_moles = volatile_kg.cwiseQuotient(M);
  auto run_at = [&](double reflux_ratio, int steps_per_cut) {
    BatchStillSettings settings;
    settings.stages_above_still = spec_.stages;
    settings.reflux_ratio = reflux_ratio;
    settings.steps_per_cut = steps_per_cut;
    settings.molar_masses = M;
    settings.minimum_residue_fraction = spec_.minimum_residue_fraction;
    settings.maximum_still_temperature = spec_.maximum_still_temperature;
    return run_batch_still(model, charge_moles, settings, spec_.cuts);
  };
  const BatchStillResult still = run_at(R, spec_.steps_per_cut);

  // Outlets. The residue is the charge less the cuts, component by
  // component, so that the mass balance closes to rounding.
  std::vector<Eigen::VectorXd> cut_kg;
  Eigen::VectorXd distilled_kg = Eigen::VectorXd::Zero(size);
  for (std::size_t c = 0; c < still.cuts.size(); ++c) {
    cut_kg.push_back(still.cuts[c].moles.cwiseProduct(M));
    distilled_kg += cut_kg.back();
    Stream& out = *cut_streams[c];
    out = Stream(components);
    out.phase_masses(Phase::liquid) = cut_kg.back();
    if (c == 0) out.phase_masses(Phase::vapour) = gas_kg;
    set_state(out, T_receiver, P);
  }
  // What is left of a component after rounding (parts in 1e-14 of its
  // charge, from summing hundreds of packets) is taken as none: such dust
  // would only bring range warnings of correlations at the pot temperature
  // for a component that is not there.
  Eigen::VectorXd residue_kg = (volatile_kg - distilled_kg).cwiseMax(0.0);
  for (Index k = 0; k < size; ++k)
    if (residue_kg[k] <= residue_dust_fraction * volatile_kg[k]) residue_kg[k] = 0.0;
  Stream& residue = ports.outlet("residue");
  residue = nonvolatile;
  residue.phase_masses(Phase::liquid) += residue_kg;
  set_state(residue, still.residue_temperature, P);

  // Range warnings of the correlations at the states reported.
  (void)bubble_temperature(components, still.initial_column.still_liquid, P, &context.warnings);
  const Eigen::VectorXd residue_x = residue_kg.cwiseQuotient(M);
  if (residue_x.sum() > 0.0) (void)bubble_temperature(components, residue_x, P, &context.warnings);

  const StillEnergy energy = still_energy(components, feed, volatile_kg, gas_kg, nonvolatile, still, M, R, T_receiver,
                                          residue, context.warnings);
  for (Stream* out : cut_streams) (void)out->enthalpy(&context.warnings);
  book_heat_duty(resources, joules(energy.reboiler_J), spec_.supply);
  book_heat_duty(resources, joules(-energy.condenser_J), spec_.supply);

  const StillTiming timing = still_timing(spec_, energy, feed.temperature(), still.initial_column.still_temperature,
                                          context.ambient_temperature, block);
  const double extra_heat = timing.wall_loss_J + timing.vessel_heat_J;
  if (extra_heat > 0.0) {
    resources.heat_drawn_J += extra_heat / spec_.supply.efficiency;
    if (spec_.supply.source == HeatSource::electric) resources.electricity_J += extra_heat / spec_.supply.efficiency;
  }
  resources.duration_s = timing.heat_up_s + timing.boiling_s;

  // ---- figures --------------------------------------------------------------------
  const double charge_kg = to_si(feed.total_mass());
  resources.add_figure("charge_mass", charge_kg, "kg", "mass of the charge");
  resources.add_figure("still_pressure", to_si(P), "Pa", "pressure in the still and column (no pressure drop)");
  resources.add_figure("initial_still_temperature", in_kelvin(still.initial_column.still_temperature), "K",
                       "bubble point of the charge: the pot temperature when boiling starts");
  for (std::size_t c = 0; c < still.cuts.size(); ++c) {
    const CutOutcome& cut = still.cuts[c];
    const std::string key = "cut_" + cut.name;
    resources.add_figure(key + "_mass", cut_kg[c].sum(), "kg", "mass of cut " + cut.name);
    resources.add_figure(key + "_head_temperature_start", in_kelvin(cut.head_temperature_start), "K",
                         "head temperature (dew point of the top vapour) when cut " + cut.name + " starts");
    resources.add_figure(key + "_head_temperature_end", in_kelvin(cut.head_temperature_end), "K",
                         "head temperature when cut " + cut.name + " ends");
    resources.add_figure(key + "_still_temperature_end", in_kelvin(cut.still_temperature_end), "K",
                         "pot temperature when cut " + cut.name + " ends");
  }
  resources.add_figure("residue_mass", to_si(residue.total_mass()), "kg", "mass left in the pot");
  resources.add_figure("residue_temperature", in_kelvin(still.residue_temperature), "K", "pot temperature at the end");
  resources.add_figure("reboiler_duty", energy.reboiler_J, "J", "heat into the pot contents, heat-up included");
  resources.add_figure("heat_up_duty", energy.heat_up_J, "J",
                       "heating the charge from its feed state to its bubble point");
  resources.add_figure("condenser_duty", energy.condenser_J, "J",
                       "heat removed in the total condenser, cooling of the distillate to the receiver included");
  resources.add_figure("boil_up_mass", energy.vapour_mass_kg, "kg", "vapour boiled up, (R + 1) times the distillate");
  resources.add_figure("heat_up_time", timing.heat_up_s, "s", "bringing the charge to the boil");
  resources.add_figure("boiling_time", timing.boiling_s, "s", "from the first drop of distillate to the end");
  if (spec_.vessel) {
    resources.add_figure("heat_lost_through_wall", timing.wall_loss_J, "J", "still wall loss, heat-up and boiling");
  } else if (spec_.boil_up) {
    resources.add_figure("mean_reboiler_power", timing.heater_power_W, "W",
                         "reboiler power that gives the stated boil-up rate");
  }

  // ---- equipment --------------------------------------------------------------------
  const double charge_volume = to_si(feed.condensed_volume());
  const double still_volume =
      spec_.vessel && spec_.vessel->volume ? to_si(*spec_.vessel->volume) : charge_volume / still_fill_fraction;
  resources.equipment.push_back({"still pot", "vessel", "volume", still_volume, "m3"});
  if (spec_.stages > 0)
    resources.equipment.push_back({"still column", "column", "stages", static_cast<double>(spec_.stages), "-"});
  resources.equipment.push_back({"still heater", "heater", "power", timing.heater_power_W, "W"});
  if (timing.boiling_s > 0.0)
    resources.equipment.push_back(
        {"still condenser", "condenser", "power", energy.condenser_J / timing.boiling_s, "W"});

  // ---- how the run ended ---------------------------------------------------------------
  for (const CutOutcome& cut : still.cuts) {
    if (cut.reached && cut.steps == 0)
      context.warnings.add("batch still '" + block + "': cut '" + cut.name +
                           "' is empty: its end condition was already met when it started");
  }
  if (still.stop != StillStop::all_cuts_taken) {
    std::string unfinished;
    for (const CutOutcome& cut : still.cuts)
      if (!cut.reached) unfinished += (unfinished.empty() ? "" : ", ") + cut.name;
    const std::string why = still.stop == StillStop::minimum_residue
                                ? "the pot came down to the minimum residue (" +
                                      format_number(100.0 * spec_.minimum_residue_fraction, 3) + " % of the charge)"
                                : "the pot reached the maximum still temperature";
    context.warnings.add("batch still '" + block + "': " + why + " before cut(s) " + unfinished +
                         " ended; the distillation stops there");
  }
  if (in_kelvin(T_receiver) > in_kelvin(still.initial_column.condensate_temperature))
    context.warnings.add("batch still '" + block +
                         "': the receiver temperature is above the bubble point of the first distillate; it would "
                         "boil in the receiver");
  if (in_kelvin(feed.temperature()) > in_kelvin(still.initial_column.still_temperature) + 1e-6)
    context.warnings.add("batch still '" + block +
                         "': the charge is above its bubble point at the still pressure and flashes as it is charged");

  // ---- the target component --------------------------------------------------------------
  if (spec_.target) {
    const TargetReport report = analyse_target(model, still, M, run_at);
    const Component& target = components[spec_.target->component];
    const std::string& cut_name = still.cuts[report.cut].name;
    resources.add_figure("target_purity_reached", report.purity, "-",
                         "mass fraction of " + target.id + " in cut " + cut_name);
    if (report.heavier_impurity)
      resources.add_figure("target_relative_volatility", report.relative_volatility, "-",
                           target.id + " over " + components[*report.heavier_impurity].id +
                               ", geometric mean of still and top stage at the start of the cut");
    if (report.minimum_stages_above_still)
      resources.add_figure("target_minimum_stages", *report.minimum_stages_above_still, "-",
                           "Fenske: theoretical stages above the still at total reflux to part " + target.id +
                               " from the next heavier component at the target purity");
    if (report.reflux_needed && std::isfinite(*report.reflux_needed))
      resources.add_figure("target_reflux_ratio_needed", *report.reflux_needed, "-",
                           "reflux ratio at the given stages with which the cut reaches the target purity");
    if (spec_.target->purity && report.purity < *spec_.target->purity) {
      std::ostringstream text;
      text << "batch still '" << block << "': " << target.id << " reaches " << format_number(100.0 * report.purity, 4)
           << " % in cut " << cut_name << ", short of the target " << format_number(100.0 * *spec_.target->purity, 4)
           << " %";
      if (report.main_impurity)
        text << "; its main impurity is " << components[*report.main_impurity].id << ", "
             << (report.main_impurity_is_lighter
                     ? "lighter than the target: take more off in the cut before it, or sharpen that break with "
                       "more stages and reflux"
                     : "heavier than the target: end the cut earlier, or add stages and reflux");
      if (report.minimum_stages_above_still && report.heavier_impurity)
        text << "; against " << components[*report.heavier_impurity].id << " Fenske asks for at least "
             << format_number(*report.minimum_stages_above_still, 3)
             << " theoretical stages above the still at total reflux";
      if (report.reflux_needed) {
        if (std::isinf(*report.reflux_needed))
          text << "; with " << spec_.stages << " stages not even a reflux ratio of "
               << format_number(highest_reflux_searched) << " reaches it with these cuts";
        else
          text << "; with " << spec_.stages << " stages a reflux ratio of about "
               << format_number(*report.reflux_needed, 3) << " reaches it with these cuts";
      }
      if (!report.search_failure.empty())
        text << "; the search for the reflux ratio needed stopped: " << report.search_failure;
      if (spec_.stages <= 2)
        text << ". A column of " << spec_.stages
             << " theoretical stage(s) is the common lab mistake: an empty tube or a short Vigreux column gives one "
                "or two; use a packed column (structured packing, metal sponge or rings) with reflux";
      context.warnings.add(text.str());
    }
  }

  // ---- cautions ---------------------------------------------------------------------------------
  double hottest_pot_K = in_kelvin(still.residue_temperature);
  for (const auto& packet : still.packets) hottest_pot_K = std::max(hottest_pot_K, in_kelvin(packet.still_temperature));
  for (std::size_t i = 0; i < n; ++i) {
    const Component& c = components[i];
    if (feed_kg[static_cast<Index>(i)] <= 0.0 || !is_self_polymerising(components, c)) continue;
    resources.cautions.push_back(
        c.id +
        " polymerises by itself when hot, and the reaction can run away: keep an inhibitor in the pot and in "
        "the receivers (for styrene, 4-tert-butylcatechol at 10-50 mg/kg), distil under vacuum so that the pot "
        "stays below about 100-120 degC, never distil to dryness, and store the distillate cool and inhibited "
        "(common practice).");
    if (hottest_pot_K > styrene_pot_limit_K)
      context.warnings.add("batch still '" + block + "': the pot reaches " + format_number(hottest_pot_K - 273.15, 4) +
                           " degC with " + c.id +
                           " in it, above about 120 degC where thermal polymerisation becomes "
                           "fast; lower the pressure");
  }
  resources.cautions.push_back(
      "The still, column and receivers hold flammable vapour: vent the receiver to a safe place, keep ignition sources "
      "away, blanket the apparatus with nitrogen, and mind the hot surfaces of the pot and heater.");
  if (to_si(P) < vacuum_below_Pa)
    resources.cautions.push_back(
        "Glassware under vacuum can implode: inspect it for star cracks and scratches, use a safety shield, and let "
        "air in only after the pot has cooled (hot residue can ignite in air).");
  resources.cautions.push_back(
      "The pot residue (heavy ends, oligomers, any char) is waste: let it cool under nitrogen and dispose of it under "
      "local rules.");
}

TargetReport BatchDistillation::analyse_target(
    const KValueModel& model, const BatchStillResult& still, const Eigen::VectorXd& M,
    const std::function<BatchStillResult(double reflux_ratio, int steps_per_cut)>& run_at) const {
  const TargetSpec& target = *spec_.target;
  const auto t = static_cast<Index>(target.component);
  auto purity_in = [&](const BatchStillResult& result, std::size_t c) {
    const Eigen::VectorXd kg = result.cuts[c].moles.cwiseProduct(M);
    return kg.sum() > 0.0 ? kg[t] / kg.sum() : 0.0;
  };
  TargetReport report;
  // The target's cut: the one named, or the one where it is purest.
  double best = -1.0;
  for (std::size_t c = 0; c < still.cuts.size(); ++c) {
    const double purity = purity_in(still, c);
    if (target.cut ? still.cuts[c].name == *target.cut : purity > best) {
      best = purity;
      report.cut = c;
    }
  }
  report.purity = std::max(best, 0.0);

  const ColumnState& start = still.cuts[report.cut].column_at_start;
  const Eigen::VectorXd& x_W = start.still_liquid;
  if (!(x_W[t] > 0.0)) return report;
  const Eigen::VectorXd K_still = model.k_values(x_W, start.still_temperature);
  const Eigen::VectorXd K_top =
      start.stage_liquid.empty() ? K_still : model.k_values(start.stage_liquid.back(), start.stage_temperature.back());

  const Eigen::VectorXd cut_kg = still.cuts[report.cut].moles.cwiseProduct(M);
  for (Index j = 0; j < cut_kg.size(); ++j) {
    if (j == t || !(cut_kg[j] > 0.0)) continue;
    if (!report.main_impurity || cut_kg[j] > cut_kg[static_cast<Index>(*report.main_impurity)])
      report.main_impurity = static_cast<std::size_t>(j);
  }
  if (report.main_impurity)
    report.main_impurity_is_lighter = K_still[static_cast<Index>(*report.main_impurity)] > K_still[t];

  // The next heavier impurity: present in the pot, less volatile than the
  // target, and the most volatile of those.
  constexpr double present = 1e-9;
  for (Index j = 0; j < x_W.size(); ++j) {
    if (j == t || x_W[j] <= present || !(K_still[j] > 0.0) || K_still[j] >= K_still[t]) continue;
    if (!report.heavier_impurity || K_still[j] > K_still[static_cast<Index>(*report.heavier_impurity)])
      report.heavier_impurity = static_cast<std::size_t>(j);
  }
  if (!target.purity) return report;
  const double p = *target.purity;

  if (report.heavier_impurity) {
    const auto h = static_cast<Index>(*report.heavier_impurity);
    report.relative_volatility = std::sqrt((K_still[t] / K_still[h]) * (K_top[t] / K_top[h]));
    // Fenske over the still and the stages: the distillate ratio the purity
    // needs (the impurity taken as all the heavier one) against the pot's
    // at the start of the cut.
    const double ratio_distillate = (p / M[t]) / ((1.0 - p) / M[h]);
    const double ratio_still = x_W[t] / x_W[h];
    if (report.relative_volatility > 1.0) {
      const double equilibrium_stages = std::log(ratio_distillate / ratio_still) / std::log(report.relative_volatility);
      report.minimum_stages_above_still = std::max(0.0, equilibrium_stages - 1.0);
    }
  }

  // The reflux ratio at the given stages: whole runs with the cuts as
  // defined, at a quarter of the steps, doubling R until the cut reaches the
  // purity, then bisecting on log R; the answer is confirmed by a run at
  // the full step count. Only when the purity is missed. The purity grows
  // with R, so the highest ratio searched is tried first: when even it
  // misses (the usual outcome when the cuts, not the column, limit the
  // purity) the doubling could not have found an answer either, and one
  // run settles it instead of four or more.
  if (report.purity >= p || spec_.stages == 0) return report;
  const int steps = std::max(25, spec_.steps_per_cut / 4);
  auto reaches_at = [&](double R, int steps_per_cut) {
    return purity_in(run_at(R, steps_per_cut), report.cut) >= p;
  };
  auto reaches = [&](double R) { return reaches_at(R, steps); };
  double low = std::max(spec_.reflux_ratio, 0.05);
  double high = 2.0 * low;
  // The search is advice, not the result: a column that will not settle at
  // some trial ratio ends the search instead of the solve.
  try {
    const bool reaches_at_highest = reaches(highest_reflux_searched);
    if (!reaches_at_highest) {
      report.reflux_needed = std::numeric_limits<double>::infinity();
      return report;
    }
    while (high < highest_reflux_searched && !reaches(high)) {
      low = high;
      high = std::min(2.0 * high, highest_reflux_searched);
    }
    constexpr double grid_factor = 1.0218971486541166;  // 2^(1/32)
    for (int i = 0; i < 5; ++i) {  // to within a factor 2^(1/32), about 2 %
      const double mid = std::sqrt(low * high);
      (reaches(mid) ? high : low) = mid;
    }
    // The coarse runs carry an integration error of their own; the ratio
    // reported must reach the purity at the step count of the block. A
    // few grid steps up cover the difference between the two.
    for (int i = 0; i < 4 && high < highest_reflux_searched && !reaches_at(high, spec_.steps_per_cut); ++i)
      high = std::min(high * grid_factor, highest_reflux_searched);
  } catch (const ModelError& e) {
    report.search_failure = e.what();
    return report;
  } catch (const ConvergenceError& e) {
    report.search_failure = e.what();
    return report;
  }
  report.reflux_needed = high;
  return report;
}

// ---- reading the parameters ----------------------------------------------------------------

std::string key_path(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

std::optional<int> whole_number(MappingReader& parameters, std::string_view key, double low, double high) {
  auto value = parameters.optional_number_in(key, low, high);
  if (!value) return std::nullopt;
  if (*value != std::floor(*value)) {
    parameters.error(
        key, "'" + key_path(parameters, key) + "' must be a whole number (found " + format_number(*value) + ")");
    return std::nullopt;
  }
  return static_cast<int>(*value);
}

bool is_simple_name(const std::string& name) {
  if (name.empty()) return false;
  return std::all_of(name.begin(), name.end(),
                     [](char ch) { return (ch >= 'a' && ch <= 'z') || (ch >= '0' && ch <= '9') || ch == '_'; });
}

std::vector<CutTarget> read_cuts(MappingReader& parameters) {
  std::vector<CutTarget> cuts;
  const std::string path = key_path(parameters, "cuts");
  const YAML::Node node = parameters.raw("cuts");
  if (!node.IsDefined() || node.IsNull()) {
    parameters.error({}, "missing required key '" + path +
                             "' (expected a list of cuts such as [{name: fore_cut, until_head_temperature: \"140 "
                             "degC\"}, {name: monomer, until_fraction_distilled: 0.8}])");
    return cuts;
  }
  if (!node.IsSequence() || node.size() == 0) {
    parameters.diagnostics().error(location_of(node, parameters.file()),
                                   "'" + path + "' must be a non-empty list of cuts");
    return cuts;
  }
  std::set<std::string> names;
  std::optional<double> last_fraction;
  std::optional<double> last_head_K;
  for (std::size_t i = 0; i < node.size(); ++i) {
    const std::string item_path = path + "[" + std::to_string(i) + "]";
    MappingReader item(node[i], parameters.file(), item_path, parameters.diagnostics(), parameters.currency());
    if (!item.is_valid()) {
      parameters.diagnostics().error(location_of(node[i], parameters.file()),
                                     "'" + item_path + "' must be a mapping with a name and an end condition");
      continue;
    }
    CutTarget cut;
    cut.name = item.text("name");
    if (!cut.name.empty() && !is_simple_name(cut.name))
      item.error("name", "'" + item_path + ".name' must be lower-case letters, digits and underscores (found \"" +
                             cut.name + "\")");
    if (!cut.name.empty() && !names.insert(cut.name).second)
      item.error("name", "'" + item_path + ".name': cut '" + cut.name + "' is defined twice");
    cut.until_head_temperature = item.optional_quantity<Temperature>("until_head_temperature");
    const bool has_head = item.has("until_head_temperature");
    cut.until_fraction_distilled = item.optional_number_in("until_fraction_distilled", 0.0, 1.0);
    const bool has_fraction = item.has("until_fraction_distilled");
    if (has_head == has_fraction) {
      item.error({}, "'" + item_path +
                         "' needs exactly one of until_head_temperature (such as \"145 degC\") and "
                         "until_fraction_distilled (a fraction of the charge mass, such as 0.6)");
    }
    if (cut.until_fraction_distilled) {
      if (*cut.until_fraction_distilled <= 0.0 || *cut.until_fraction_distilled >= 1.0)
        item.error("until_fraction_distilled", "'" + item_path + ".until_fraction_distilled' must lie between 0 and 1");
      if (last_fraction && *cut.until_fraction_distilled <= *last_fraction)
        item.error("until_fraction_distilled", "'" + item_path +
                                                   ".until_fraction_distilled' counts from the start of the run and "
                                                   "must exceed the previous cut's (" +
                                                   format_number(*last_fraction) + ")");
      last_fraction = cut.until_fraction_distilled;
    }
    if (cut.until_head_temperature) {
      const double T = in_kelvin(*cut.until_head_temperature);
      if (last_head_K && T <= *last_head_K)
        item.error("until_head_temperature",
                   "'" + item_path + ".until_head_temperature' must be above the previous cut's end temperature");
      last_head_K = T;
    }
    item.finish();
    cuts.push_back(std::move(cut));
  }
  return cuts;
}

std::optional<BoilUpRate> read_boil_up(MappingReader& parameters) {
  if (!parameters.has("boil_up_rate")) {
    parameters.accept("boil_up_rate");
    return std::nullopt;
  }
  const YAML::Node node = parameters.raw("boil_up_rate");
  const std::string path = key_path(parameters, "boil_up_rate");
  auto parsed = detail::parse_node(node, parameters.file(), path, parameters.diagnostics());
  if (!parsed) return std::nullopt;
  BoilUpRate rate;
  if (parsed->dimension == dimension_of<MassFlow>()) {
    rate.molar = false;
  } else if (parsed->dimension == dimension_of<MolarFlow>()) {
    rate.molar = true;
  } else {
    parameters.diagnostics().error(location_of(node, parameters.file()),
                                   "'" + path +
                                       "': wrong dimension (expected a mass flow such as \"2 kg/h\" or a "
                                       "molar flow such as \"20 mol/h\", found " +
                                       parsed->dimension.describe() + ")");
    return std::nullopt;
  }
  rate.rate = parsed->si_value();
  if (!(rate.rate > 0.0)) {
    parameters.diagnostics().error(location_of(node, parameters.file()), "'" + path + "' must be positive");
    return std::nullopt;
  }
  return rate;
}

std::unique_ptr<BlockModel> make_batch_distillation(MappingReader& parameters, const BlockSetup& setup) {
  StillSpec spec;
  if (!parameters.has("stages"))
    parameters.error({}, "missing required key '" + key_path(parameters, "stages") +
                             "' (expected the theoretical stages above the still, 0 for simple distillation)");
  spec.stages = whole_number(parameters, "stages", 0.0, 200.0).value_or(0);

  if (auto R = parameters.optional_number_in("reflux_ratio", 0.0, 1e4)) {
    spec.reflux_ratio = *R;
  } else if (!parameters.has("reflux_ratio") && spec.stages > 0) {
    parameters.error({}, "missing required key '" + key_path(parameters, "reflux_ratio") +
                             "' (expected the reflux ratio L/D, such as 3)");
  }
  spec.pressure = parameters.optional_quantity<Pressure>("pressure");
  if (spec.pressure && !(to_si(*spec.pressure) > 0.0)) {
    parameters.error("pressure", "'" + key_path(parameters, "pressure") + "' must be an absolute pressure above zero");
    spec.pressure.reset();
  }
  spec.cuts = read_cuts(parameters);
  spec.steps_per_cut = whole_number(parameters, "integration_steps", 2.0, 1e5).value_or(200);
  spec.minimum_residue_fraction = parameters.number_in("minimum_residue_fraction", 0.05, 0.001, 0.9);
  spec.maximum_still_temperature = parameters.optional_quantity<Temperature>("maximum_still_temperature");
  spec.distillate_temperature = parameters.optional_quantity<Temperature>("distillate_temperature");

  spec.boil_up = read_boil_up(parameters);
  spec.reboiler_power = parameters.optional_quantity<Power>("reboiler_power");
  if (spec.reboiler_power && !(to_si(*spec.reboiler_power) > 0.0)) {
    parameters.error("reboiler_power", "'" + key_path(parameters, "reboiler_power") + "' must be positive");
    spec.reboiler_power.reset();
  }
  const int drives =
      int{parameters.has("boil_up_rate")} + int{parameters.has("reboiler_power")} + int{parameters.has("heater_power")};
  if (drives > 1) {
    parameters.error({}, "give only one of '" + key_path(parameters, "boil_up_rate") + "', '" +
                             key_path(parameters, "reboiler_power") + "' and '" + key_path(parameters, "heater_power") +
                             "' (with the still's vessel)");
  } else if (drives == 0) {
    parameters.error({}, "missing '" + key_path(parameters, "boil_up_rate") + "', '" +
                             key_path(parameters, "reboiler_power") + "' or '" + key_path(parameters, "heater_power") +
                             "' (expected a boil-up rate such as \"2 kg/h\", the net heat into the pot such as "
                             "\"500 W\", or the heater power with the still's vessel_volume and vessel_mass, which "
                             "also give the heat-up and wall losses)");
  }
  if (drives == 1 && parameters.has("heater_power")) spec.vessel = read_vessel_design(parameters);
  spec.supply = read_heat_supply(parameters);

  const auto target = read_component(parameters, "target_component", setup.components, false);
  const auto purity = parameters.optional_number_in("target_purity", 0.0, 1.0);
  const auto target_cut = parameters.optional_text("target_cut");
  if (target) {
    spec.target = TargetSpec{*target, purity, target_cut};
    if (purity && (*purity <= 0.0 || *purity >= 1.0))
      parameters.error("target_purity", "'" + key_path(parameters, "target_purity") + "' must lie between 0 and 1");
    if (target_cut &&
        std::none_of(spec.cuts.begin(), spec.cuts.end(), [&](const CutTarget& c) { return c.name == *target_cut; }))
      parameters.error("target_cut",
                       "'" + key_path(parameters, "target_cut") + "': no cut is named '" + *target_cut + "'");
    if (setup.components[*target].kind != ComponentKind::volatile_liquid)
      parameters.error("target_component", "'" + key_path(parameters, "target_component") + "': '" +
                                               setup.components[*target].id + "' does not distil");
  } else if (!parameters.has("target_component") && (purity || target_cut)) {
    parameters.error({}, "'" + key_path(parameters, "target_purity") + "' and '" + key_path(parameters, "target_cut") +
                             "' need '" + key_path(parameters, "target_component") + "'");
  }
  parameters.finish();
  return std::make_unique<BatchDistillation>(std::move(spec));
}

}  // namespace

void register_batch_distillation(BlockRegistry& registry) {
  registry.add({"batch_distillation",
                "batch still with a column of theoretical stages and total condenser; takes cuts by head temperature "
                "or fraction distilled",
                make_batch_distillation});
}

}  // namespace unchain::units
