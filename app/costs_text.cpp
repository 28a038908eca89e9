#include "app/costs_text.hpp"

#include <map>
#include <sstream>

#include "app/summary_text.hpp"

namespace unchain::app {

namespace {

constexpr double J_per_kWh = 3.6e6;
constexpr double J_per_MJ = 1e6;

std::string per_kg_text(const costs::CostReport& r, double per_batch, int significant = 4) {
  auto v = r.per_kg(per_batch);
  return v ? format_number(*v, significant) : std::string("-");
}

std::string percent(double fraction) { return format_number(100.0 * fraction, 3) + " %"; }

void cash_flow_text(std::ostringstream& out, const std::string& cur, const costs::CashFlowResult& cf) {
  int construction = 0, operating = 0;
  for (const auto& y : cf.years) (y.operating_year == 0 ? construction : operating) += 1;
  out << "\nDiscounted cash flow (" << cur << "; amounts at the end of each year, t = 0 at the end of the first "
      << "construction year)\n";
  out << "  fixed capital " << format_number(cf.inputs.fixed_capital) << " over " << construction
      << " construction year(s), working capital " << format_number(cf.working_capital) << ", salvage "
      << format_number(cf.salvage_value) << "; " << operating << " operating years\n";
  out << "  a year at full capacity: " << format_number(cf.inputs.annual_monomer_kg) << " kg of monomer at "
      << format_number(cf.inputs.monomer_price) << " " << cur << "/kg, other revenue "
      << format_number(cf.inputs.annual_other_revenue) << ", operating cost "
      << format_number(cf.inputs.annual_operating_cost) << " " << cur << "/yr\n";
  out << "  NPV at " << percent(cf.discount_rate) << " a year: " << format_number(cf.npv) << " " << cur << "; IRR "
      << (cf.irr ? percent(*cf.irr) : std::string("none")) << "; payback "
      << (cf.payback_years ? format_number(*cf.payback_years, 3) + " yr from start-up"
                           : std::string("not within the project life"))
      << "\n";
  if (cf.minimum_selling_price)
    out << "  minimum monomer selling price (NPV zero): " << format_number(*cf.minimum_selling_price) << " " << cur
        << "/kg\n";
  std::vector<std::vector<std::string>> rows;
  for (const auto& y : cf.years)
    rows.push_back({std::to_string(y.year), y.operating_year ? std::to_string(y.operating_year) : std::string("build"),
                    format_number(y.capacity, 3), format_number(y.revenue), format_number(y.operating_cost),
                    format_number(y.depreciation), format_number(y.tax), format_number(y.capital),
                    format_number(y.net_cash_flow), format_number(y.cumulative_discounted)});
  out << format_table({"t yr", "operating year", "capacity", "revenue " + cur, "operating cost " + cur,
                       "depreciation " + cur, "tax " + cur, "capital " + cur, "net " + cur, "cumulative PV " + cur},
                      rows, "rrrrrrrrrr");
  for (const auto& note : cf.notes) out << "  note: " << note << "\n";
}

}  // namespace

std::string costs_summary_text(const Case& c, const costs::CostReport& r) {
  std::ostringstream out;
  const std::string basis = r.basis_label;  // "batch" or "hour"
  const std::string cur = c.currency;

  out << "\nMonomer and yield\n";
  if (r.monomer_kg) {
    out << "  monomer (" << r.monomer_component << "): " << format_number(*r.monomer_kg) << " kg per " << basis
        << ", purity " << format_number(100.0 * r.monomer_purity.value_or(0.0), 4) << " % by mass\n";
  }
  out << "  polymer fed: " << format_number(r.polymer_fed_kg) << " kg per " << basis << "\n";
  if (r.monomer_yield) out << "  monomer yield on polymer fed: " << format_number(100.0 * *r.monomer_yield, 4) << " %\n";
  for (const auto& note : r.notes) out << "  note: " << note << "\n";

  out << "\nEnergy by block\n";
  std::vector<std::vector<std::string>> rows;
  for (const auto& b : r.energy_by_block) {
    rows.push_back({b.block, b.type, format_fixed(b.heat_J / J_per_kWh, 3),
                    format_fixed((b.electricity_J + b.chiller_electricity_J) / J_per_kWh, 3),
                    format_fixed(b.fuel_J / J_per_kWh, 3), format_fixed(b.cooling_J / J_per_kWh, 3),
                    per_kg_text(r, b.purchased_J / J_per_MJ)});
  }
  const auto& t = r.energy_total;
  rows.push_back({"total", "", format_fixed(t.heat_J / J_per_kWh, 3),
                  format_fixed((t.electricity_J + t.chiller_electricity_J) / J_per_kWh, 3),
                  format_fixed(t.fuel_J / J_per_kWh, 3), format_fixed(t.cooling_J / J_per_kWh, 3),
                  per_kg_text(r, t.purchased_J / J_per_MJ)});
  out << format_table({"block", "type", "heat kWh/" + basis, "electricity kWh/" + basis, "fuel kWh/" + basis,
                       "cooling kWh/" + basis, "purchased MJ/kg monomer"},
                      rows, "llrrrrr");
  if (r.monomer_kg && *r.monomer_kg > 0.0) {
    out << "  purchased energy per kg of monomer: " << per_kg_text(r, t.purchased_J / J_per_MJ) << " MJ/kg ("
        << per_kg_text(r, t.purchased_J / J_per_kWh) << " kWh/kg)\n";
  }
  if (r.minimum_energy) {
    out << "  thermodynamic minimum (heat polymer, depolymerize, vaporize at "
        << format_celsius_brief(r.minimum_energy->reaction_temperature_K) << " degC; no losses): "
        << format_number(r.minimum_energy->per_kg_monomer_J / J_per_MJ) << " MJ/kg";
    if (r.efficiency_ratio) out << "; this set-up reaches " << format_number(100.0 * *r.efficiency_ratio, 3) << " % of it";
    out << "\n";
  }

  out << "\nSolvent and water (per " << basis << " | per kg of monomer)\n";
  auto line = [&](const std::string& label, double value, const std::string& unit) {
    out << "  " << label << ": " << format_number(value) << " " << unit << " | " << per_kg_text(r, value) << " " << unit
        << "/kg\n";
  };
  line("solvent bought", r.solvent_bought_kg, "kg");
  line("solvent recovered", r.solvent_recovered_kg, "kg");
  line("solvent lost", r.solvent_lost_kg, "kg");
  line("process water", r.process_water_m3, "m3");
  line("cooling water", r.cooling_water_m3, "m3");
  line("inert gas (0 degC, 1 atm)", r.inert_gas_m3, "m3");

  if (!r.wastes.empty()) {
    out << "\nWaste streams\n";
    rows.clear();
    for (const auto& w : r.wastes)
      rows.push_back({w.stream, w.waste_class, format_number(w.mass_kg), per_kg_text(r, w.mass_kg),
                      w.priced ? format_number(w.disposal_cost) : std::string("no price"), w.description});
    out << format_table({"stream", "class", "kg/" + basis, "kg/kg monomer", "disposal " + cur + "/" + basis, "contents"},
                        rows, "llrrrl");
  }

  out << "\nCosts (" << cur << ")\n";
  rows.clear();
  for (const auto& l : r.lines)
    rows.push_back({costs::cost_category_name(l.category), l.item, format_number(l.cost), per_kg_text(r, l.cost)});
  out << format_table({"category", "item", cur + "/" + basis, cur + "/kg monomer"}, rows, "llrr");
  out << "  total cost " << format_number(r.total_cost) << " " << cur << "/" << basis << " (" << per_kg_text(r, r.total_cost)
      << " " << cur << "/kg), credits " << format_number(r.total_credits) << ", net cost " << format_number(r.net_cost)
      << " " << cur << "/" << basis << " (" << per_kg_text(r, r.net_cost) << " " << cur << "/kg monomer)\n";
  if (r.monomer_price)
    out << "  monomer sold at " << format_number(*r.monomer_price) << " " << cur << "/kg: revenue "
        << format_number(r.monomer_revenue) << ", margin " << format_number(r.margin) << " " << cur << "/" << basis << "\n";
  if (r.co2e_kg > 0.0)
    out << "  CO2e: " << format_number(r.co2e_kg) << " kg/" << basis << " (" << per_kg_text(r, r.co2e_kg) << " kg/kg monomer)\n";
  for (const auto& m : r.missing_prices) out << "  missing price: " << m << " (costed as zero)\n";

  if (!r.capital.items.empty()) {
    out << "\nCapital (" << cur << ")\n";
    rows.clear();
    for (const auto& i : r.capital.items)
      rows.push_back({i.block, i.item, format_number(i.size) + " " + i.unit, i.method, format_number(i.purchased_cost),
                      format_number(i.installation_factor, 3), format_number(i.installed_cost)});
    out << format_table({"block", "item", "size", "method", "purchased", "factor", "installed"}, rows, "lllllrr");
    out << "  installed total " << format_number(r.capital.installed_total) << ", capital recovery factor "
        << format_number(r.capital.capital_recovery_factor) << ", annual charge "
        << format_number(r.capital.annual_capital_charge) << ", per " << basis << " "
        << format_number(r.capital.capital_charge_per_batch) << "\n";
    for (const auto& i : r.capital.items)
      if (!i.note.empty()) out << "  note: " << i.block << " / " << i.item << ": " << i.note << "\n";
  }
  if (r.cash_flow) cash_flow_text(out, cur, *r.cash_flow);
  return out.str();
}

}  // namespace unchain::app
