#include "costs/batch_economics.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "costs/heating_value.hpp"
#include "flowsheet/diagnostics.hpp"

namespace unchain::costs {

const char* cost_category_name(CostCategory c) {
  switch (c) {
    case CostCategory::energy: return "energy";
    case CostCategory::solvent: return "solvent";
    case CostCategory::water: return "water";
    case CostCategory::waste: return "waste";
    case CostCategory::labour: return "labour";
    case CostCategory::capital: return "capital";
    case CostCategory::materials: return "materials";
    case CostCategory::credit: return "credit";
  }
  return "other";
}

std::optional<double> CostReport::per_kg(double per_batch) const {
  if (!monomer_kg || *monomer_kg <= 0.0) return std::nullopt;
  return per_batch / *monomer_kg;
}

namespace {

// Cooling water: 1000 kg/m3 and cp 4.18 kJ/(kg K) (common practice).
constexpr double water_density = 1000.0;
constexpr double water_cp = 4180.0;

double solvent_mass(const Stream& s, const std::vector<std::string>& solvents) {
  double total = 0.0;
  for (const auto& id : solvents)
    if (auto i = s.components().index_of(id)) total += s.component_masses()[static_cast<Eigen::Index>(*i)];
  return total;
}

std::string describe_contents(const Stream& s) {
  const Eigen::VectorXd m = s.component_masses();
  const double total = m.sum();
  std::vector<std::pair<double, std::string>> parts;
  for (std::size_t i = 0; i < s.size(); ++i)
    if (m[static_cast<Eigen::Index>(i)] > 0.0) parts.emplace_back(m[static_cast<Eigen::Index>(i)], s.components()[i].id);
  std::sort(parts.rbegin(), parts.rend());
  std::ostringstream out;
  out.precision(3);
  for (std::size_t k = 0; k < parts.size() && k < 3; ++k) {
    if (k) out << ", ";
    out << parts[k].second << " " << 100.0 * parts[k].first / total << " %";
  }
  return out.str();
}

void add_line(CostReport& r, CostCategory category, std::string item, double quantity, std::string unit, double cost) {
  r.lines.push_back({category, std::move(item), quantity, std::move(unit), cost});
}

}  // namespace

CostReport evaluate_costs(const Case& c, const SolveResult& result, const PriceBook& prices,
                          const Accounting& accounting, const CapitalSettings& capital_settings) {
  CostReport r;
  r.basis_label = c.basis == Basis::batch ? "batch" : "hour";
  auto missing = [&](const std::string& what) {
    if (std::find(r.missing_prices.begin(), r.missing_prices.end(), what) == r.missing_prices.end())
      r.missing_prices.push_back(what);
  };

  // ---- monomer and polymer fed -------------------------------------------
  if (accounting.monomer_stream) {
    const Stream& m = result.streams[*c.stream_index(*accounting.monomer_stream)];
    const std::size_t i = c.components->require(accounting.monomer_component);
    r.monomer_component = accounting.monomer_component;
    r.monomer_kg = m.component_masses()[static_cast<Eigen::Index>(i)];
    const double total = to_si(m.total_mass());
    r.monomer_purity = total > 0.0 ? *r.monomer_kg / total : 0.0;
  } else {
    r.notes.push_back("no accounting.monomer in the case: figures per kilogram of monomer are not computed");
  }
  for (const auto& name : accounting.polymer_feeds) {
    const Stream& s = result.streams[*c.stream_index(name)];
    for (std::size_t i = 0; i < s.size(); ++i)
      if (s.components()[i].kind == ComponentKind::polymer) r.polymer_fed_kg += s.component_masses()[static_cast<Eigen::Index>(i)];
  }
  if (r.monomer_kg && r.polymer_fed_kg > 0.0) r.monomer_yield = *r.monomer_kg / r.polymer_fed_kg;

  // ---- energy by block and kind --------------------------------------------
  for (const BlockResult& b : result.blocks) {
    BlockEnergy e;
    e.block = b.name;
    e.type = b.type;
    e.heat_J = b.resources.heat_drawn_J;
    e.electricity_J = b.resources.electricity_J;
    if (b.resources.heat_source == "fuel") e.fuel_J = b.resources.heat_drawn_J / prices.burner_efficiency;
    e.cooling_J = b.resources.cooling_J;
    if (prices.cooling == CoolingSupply::chiller)
      e.chiller_electricity_J = e.cooling_J / prices.chiller_coefficient_of_performance;
    else
      r.cooling_water_m3 += e.cooling_J / (water_density * water_cp * to_si(prices.cooling_water_temperature_rise));
    e.purchased_J = e.electricity_J + e.fuel_J + e.chiller_electricity_J;
    r.energy_total.heat_J += e.heat_J;
    r.energy_total.electricity_J += e.electricity_J;
    r.energy_total.fuel_J += e.fuel_J;
    r.energy_total.cooling_J += e.cooling_J;
    r.energy_total.chiller_electricity_J += e.chiller_electricity_J;
    r.energy_total.purchased_J += e.purchased_J;
    r.energy_by_block.push_back(e);

    for (const MaterialUse& use : b.resources.materials) {
      if (use.kind == "process_water") r.process_water_m3 += use.unit == "kg" ? use.amount / water_density : use.amount;
      else if (use.kind == "inert_gas")
        // Given by mass, taken as nitrogen (28.0134 g/mol) at 0 degC, 1 atm (22.414 L/mol).
        r.inert_gas_m3 += use.unit == "kg" ? use.amount / 0.0280134 * 0.022414 : use.amount;
      else if (use.kind == "solvent_makeup") r.solvent_bought_kg += use.amount;
    }
  }
  r.energy_total.block = "total";

  const double electricity_total = r.energy_total.electricity_J + r.energy_total.chiller_electricity_J;
  if (electricity_total > 0.0) {
    if (prices.electricity) add_line(r, CostCategory::energy, "electricity", electricity_total, "J", electricity_total * to_si(*prices.electricity));
    else missing("prices.electricity");
  }
  if (r.energy_total.fuel_J > 0.0) {
    if (prices.fuel) add_line(r, CostCategory::energy, "fuel", r.energy_total.fuel_J, "J", r.energy_total.fuel_J * to_si(*prices.fuel));
    else missing("prices.fuel");
  }
  if (r.cooling_water_m3 > 0.0) {
    if (prices.cooling_water) add_line(r, CostCategory::water, "cooling water", r.cooling_water_m3, "m3", r.cooling_water_m3 * to_si(*prices.cooling_water));
    else missing("prices.cooling_water");
  }

  // ---- solvent -------------------------------------------------------------
  for (const auto& name : accounting.solvent_makeup_feeds)
    r.solvent_bought_kg += solvent_mass(result.streams[*c.stream_index(name)], accounting.solvents);
  for (std::size_t s = 0; s < c.streams.size(); ++s) {
    const StreamInfo& info = c.streams[s];
    const double m = solvent_mass(result.streams[s], accounting.solvents);
    if (!info.destination && !info.is_feed) r.solvent_lost_kg += m;
    if (info.source_role == "recovered_solvent") r.solvent_recovered_kg += m;
  }
  if (r.solvent_bought_kg > 0.0) {
    for (const auto& id : accounting.solvents) {
      double bought = 0.0;
      for (const auto& name : accounting.solvent_makeup_feeds) bought += solvent_mass(result.streams[*c.stream_index(name)], {id});
      if (bought <= 0.0) continue;
      auto price = prices.solvents.find(id);
      if (price != prices.solvents.end()) add_line(r, CostCategory::solvent, id, bought, "kg", bought * to_si(price->second));
      else missing("prices.solvents." + id);
    }
  }

  // ---- water and other materials ---------------------------------------------
  for (const auto& name : accounting.water_feeds) {
    const Stream& s = result.streams[*c.stream_index(name)];
    if (auto i = s.components().index_of("water")) r.process_water_m3 += s.component_masses()[static_cast<Eigen::Index>(*i)] / water_density;
  }
  if (r.process_water_m3 > 0.0) {
    if (prices.process_water) add_line(r, CostCategory::water, "process water", r.process_water_m3, "m3", r.process_water_m3 * to_si(*prices.process_water));
    else missing("prices.process_water");
  }
  if (r.inert_gas_m3 > 0.0) {
    if (prices.inert_gas) add_line(r, CostCategory::materials, "inert gas", r.inert_gas_m3, "m3", r.inert_gas_m3 * to_si(*prices.inert_gas));
    else missing("prices.inert_gas");
  }
  if (r.monomer_kg && prices.inhibitor_dose > 0.0) {
    const double inhibitor_kg = prices.inhibitor_dose * *r.monomer_kg;
    if (prices.inhibitor) add_line(r, CostCategory::materials, "inhibitor", inhibitor_kg, "kg", inhibitor_kg * to_si(*prices.inhibitor));
    else missing("prices.inhibitor");
  }

  // ---- wastes ------------------------------------------------------------------
  for (const WasteStream& w : accounting.wastes) {
    const Stream& s = result.streams[*c.stream_index(w.stream)];
    WasteLine line;
    line.stream = w.stream;
    line.waste_class = waste_class_name(w.waste_class);
    line.description = w.description.empty() ? describe_contents(s) : w.description;
    line.mass_kg = to_si(s.total_mass());
    Stream condensed = s;
    condensed.phase_masses(Phase::vapour).setZero();
    line.volume_m3 = to_si(condensed.condensed_volume());
    std::optional<double> unit_price;
    double quantity = line.mass_kg;
    std::string unit = "kg";
    std::string price_key;
    switch (w.waste_class) {
      case WasteClass::aqueous:
        price_key = "prices.wastewater_disposal";
        if (prices.wastewater_disposal) unit_price = to_si(*prices.wastewater_disposal);
        quantity = line.volume_m3;
        unit = "m3";
        break;
      case WasteClass::vent_gas:
        line.priced = true;  // vented or flared: no disposal charge modelled
        break;
      default:
        if (w.hazardous) {
          price_key = "prices.hazardous_waste_disposal";
          if (prices.hazardous_waste_disposal) unit_price = to_si(*prices.hazardous_waste_disposal);
        } else {
          price_key = "prices.solid_waste_disposal";
          if (prices.solid_waste_disposal) unit_price = to_si(*prices.solid_waste_disposal);
        }
    }
    if (unit_price) {
      line.disposal_cost = quantity * *unit_price;
      line.priced = true;
      add_line(r, CostCategory::waste, w.stream + " (" + line.waste_class + ")", quantity, unit, line.disposal_cost);
    } else if (!price_key.empty() && quantity > 0.0) {
      missing(price_key);
    }
    r.wastes.push_back(line);
  }

  // ---- labour and capital --------------------------------------------------------
  if (to_si(prices.labour_hours_per_batch) > 0.0) {
    if (prices.labour_rate) {
      const double hours = to_si(prices.labour_hours_per_batch);
      add_line(r, CostCategory::labour, "labour", hours, "s", hours * to_si(*prices.labour_rate));
    } else {
      missing("prices.labour_rate");
    }
  }
  if (capital_settings.present) {
    r.capital = estimate_capital(c, result, capital_settings);
    add_line(r, CostCategory::capital, "capital charge", r.capital.installed_total, c.currency, r.capital.capital_charge_per_batch);
  }

  for (const auto& line : r.lines) r.total_cost += line.cost;

  // ---- credits ---------------------------------------------------------------------
  for (const ByproductStream& b : accounting.byproducts) {
    const Stream& s = result.streams[*c.stream_index(b.stream)];
    if (b.credit == CreditKind::fuel) {
      const double lhv = to_si(lower_heating_value(s));
      if (prices.byproduct_fuel_value) {
        const double credit = lhv * to_si(*prices.byproduct_fuel_value);
        add_line(r, CostCategory::credit, b.stream + " as fuel", lhv, "J", -credit);
        r.total_credits += credit;
      } else {
        missing("prices.byproduct_fuel_value");
      }
    } else {
      const std::size_t i = c.components->require(b.component);
      const double kg = s.component_masses()[static_cast<Eigen::Index>(i)];
      auto price = prices.byproduct_chemicals.find(b.component);
      if (price != prices.byproduct_chemicals.end()) {
        const double credit = kg * to_si(price->second);
        add_line(r, CostCategory::credit, b.stream + " as " + b.component, kg, "kg", -credit);
        r.total_credits += credit;
      } else {
        missing("prices.byproduct_chemicals." + b.component);
      }
    }
  }
  if (prices.gate_fee && r.polymer_fed_kg > 0.0) {
    const double credit = r.polymer_fed_kg * to_si(*prices.gate_fee);
    add_line(r, CostCategory::credit, "gate fee for waste polymer", r.polymer_fed_kg, "kg", -credit);
    r.total_credits += credit;
  }
  r.net_cost = r.total_cost - r.total_credits;

  if (r.monomer_kg && r.monomer_purity) {
    if (const PurityGrade* grade = prices.grade_for(r.monomer_component, *r.monomer_purity)) {
      r.monomer_price = to_si(grade->price);
      r.monomer_revenue = *r.monomer_kg * *r.monomer_price;
    } else if (prices.products.count(r.monomer_component) != 0) {
      r.notes.push_back("the monomer's purity reaches no priced grade: no revenue counted");
    }
  }
  r.margin = r.monomer_revenue - r.net_cost;

  // ---- emissions ------------------------------------------------------------------------
  if (prices.grid_emission_factor) r.co2e_kg += electricity_total * to_si(*prices.grid_emission_factor);
  if (prices.fuel_emission_factor) r.co2e_kg += r.energy_total.fuel_J * to_si(*prices.fuel_emission_factor);

  // ---- distance from the minimum energy -------------------------------------------------
  if (r.monomer_kg && *r.monomer_kg > 0.0) {
    const Component& monomer = (*c.components)[c.components->require(r.monomer_component)];
    const Component* polymer = nullptr;
    for (const auto& comp : c.components->components())
      if (comp.polymer && comp.polymer->monomer == monomer.id) polymer = &comp;
    if (polymer != nullptr) {
      // The reaction temperature: the pyrolysis block's, else the ceiling temperature.
      std::optional<double> T_r;
      for (const BlockResult& b : result.blocks)
        if (const BlockFigure* f = b.resources.figure("reactor_temperature")) T_r = f->value;
      if (!T_r && polymer->polymer->ceiling_temperature) T_r = polymer->polymer->ceiling_temperature->value;
      if (T_r) {
        r.minimum_energy = minimum_energy_per_kg_monomer(*polymer, monomer, kelvin(*T_r));
        const double modelled = r.energy_total.purchased_J / *r.monomer_kg;
        if (modelled > 0.0) r.efficiency_ratio = r.minimum_energy->per_kg_monomer_J / modelled;
      }
    }
  }
  return r;
}

CashFlowBasis cash_flow_basis(const Case& c, const CostReport& report, const CashFlowSettings& settings,
                              const CapitalSettings& capital) {
  CashFlowBasis b;
  b.basis_per_year = c.basis == Basis::batch ? settings.batches_per_year.value_or(capital.batches_per_year)
                                             : settings.operating_hours_per_year.value_or(capital.operating_hours_per_year);
  if (!report.monomer_kg || *report.monomer_kg <= 0.0) {
    b.reason = "no monomer product (accounting.monomer): no discounted cash flow";
    return b;
  }
  if (!report.monomer_price) {
    b.reason = "no price for the monomer at the purity it reaches (prices.products): no discounted cash flow";
    return b;
  }
  double capital_charge = 0.0;
  for (const auto& line : report.lines)
    if (line.category == CostCategory::capital) capital_charge += line.cost;
  CashFlowInputs in;
  in.fixed_capital = report.capital.installed_total;
  in.annual_monomer_kg = *report.monomer_kg * b.basis_per_year;
  in.monomer_price = *report.monomer_price;
  in.annual_other_revenue = report.total_credits * b.basis_per_year;
  in.annual_operating_cost = (report.total_cost - capital_charge) * b.basis_per_year;
  b.inputs = in;
  return b;
}

CostReport evaluate_case_costs(const Case& c, const SolveResult& result, const SharedPriceFile* shared_prices,
                               std::shared_ptr<const CostSettings>& settings) {
  DiagnosticList diagnostics;
  const PriceBook prices = read_price_book(c.document, c.file, c.currency, diagnostics, shared_prices);
  std::shared_ptr<CostSettings> read;
  if (!settings) {
    read = std::make_shared<CostSettings>();
    read->accounting = read_accounting(c, diagnostics);
    read->capital = read_capital_settings(c, diagnostics);
    read->economics = read_cash_flow_settings(c, diagnostics);
  }
  diagnostics.throw_if_errors();
  if (read) settings = std::move(read);
  const CapitalSettings& capital = settings->capital;
  const CashFlowSettings& economics = settings->economics;
  CostReport report = evaluate_costs(c, result, prices, settings->accounting, capital);
  if (economics.present) {
    const CashFlowBasis basis = cash_flow_basis(c, report, economics, capital);
    if (basis.inputs) {
      report.cash_flow = discounted_cash_flow(economics, *basis.inputs);
      if (!capital.present)
        report.cash_flow->notes.insert(report.cash_flow->notes.begin(),
                                       "no capital section: the fixed capital is taken as zero");
    } else {
      report.notes.push_back(basis.reason);
    }
  }
  return report;
}

CostReport evaluate_case_costs(const Case& c, const SolveResult& result, const SharedPriceFile* shared_prices) {
  std::shared_ptr<const CostSettings> settings;
  return evaluate_case_costs(c, result, shared_prices, settings);
}

CostReport evaluate_case_costs(const Case& c, const SolveResult& result) {
  return evaluate_case_costs(c, result, nullptr);
}

}  // namespace unchain::costs
