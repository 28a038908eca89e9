#include "app/costs_json.hpp"

#include <map>

namespace unchain::app {

namespace {

constexpr double J_per_kWh = 3.6e6;
constexpr double J_per_MJ = 1e6;

Json optional_number(const std::optional<double>& v) { return v ? Json(*v) : Json(nullptr); }

Json per_kg(const costs::CostReport& r, double per_batch) { return optional_number(r.per_kg(per_batch)); }

Json cash_flow_to_json(const costs::CashFlowResult& cf) {
  Json j;
  j["npv"] = cf.npv;
  j["irr"] = optional_number(cf.irr);
  j["payback_years"] = optional_number(cf.payback_years);
  j["minimum_selling_price"] = optional_number(cf.minimum_selling_price);
  j["discount_rate"] = cf.discount_rate;
  j["fixed_capital"] = cf.inputs.fixed_capital;
  j["working_capital"] = cf.working_capital;
  j["salvage_value"] = cf.salvage_value;
  j["annual_monomer_kg"] = cf.inputs.annual_monomer_kg;
  j["monomer_price_per_kg"] = cf.inputs.monomer_price;
  j["annual_other_revenue"] = cf.inputs.annual_other_revenue;
  j["annual_operating_cost"] = cf.inputs.annual_operating_cost;
  Json years = Json::array();
  for (const auto& y : cf.years) {
    Json row;
    row["year"] = y.year;
    row["operating_year"] = y.operating_year;
    row["capacity"] = y.capacity;
    row["revenue"] = y.revenue;
    row["operating_cost"] = y.operating_cost;
    row["depreciation"] = y.depreciation;
    row["taxable_income"] = y.taxable_income;
    row["tax"] = y.tax;
    row["loss_carried_forward"] = y.loss_carried_forward;
    row["capital"] = y.capital;
    row["net_cash_flow"] = y.net_cash_flow;
    row["discounted_cash_flow"] = y.discounted_cash_flow;
    row["cumulative_discounted"] = y.cumulative_discounted;
    years.push_back(row);
  }
  j["years"] = years;
  j["notes"] = cf.notes;
  return j;
}

}  // namespace

Json kpis_to_json(const costs::CostReport& r) {
  Json k;
  k["basis"] = r.basis_label;
  k["monomer_component"] = r.monomer_component.empty() ? Json(nullptr) : Json(r.monomer_component);
  k["monomer_kg"] = optional_number(r.monomer_kg);
  k["monomer_purity"] = optional_number(r.monomer_purity);
  k["polymer_fed_kg"] = r.polymer_fed_kg;
  k["monomer_yield"] = optional_number(r.monomer_yield);

  const auto& e = r.energy_total;
  Json batch;
  batch["energy_purchased_J"] = e.purchased_J;
  batch["energy_purchased_kWh"] = e.purchased_J / J_per_kWh;
  batch["electricity_kWh"] = (e.electricity_J + e.chiller_electricity_J) / J_per_kWh;
  batch["heat_kWh"] = e.heat_J / J_per_kWh;
  batch["fuel_kWh"] = e.fuel_J / J_per_kWh;
  batch["cooling_kWh"] = e.cooling_J / J_per_kWh;
  batch["solvent_bought_kg"] = r.solvent_bought_kg;
  batch["solvent_recovered_kg"] = r.solvent_recovered_kg;
  batch["solvent_lost_kg"] = r.solvent_lost_kg;
  batch["process_water_m3"] = r.process_water_m3;
  batch["cooling_water_m3"] = r.cooling_water_m3;
  batch["inert_gas_m3"] = r.inert_gas_m3;
  batch["total_cost"] = r.total_cost;
  batch["credits"] = r.total_credits;
  batch["net_cost"] = r.net_cost;
  batch["co2e_kg"] = r.co2e_kg;
  k["per_batch"] = batch;

  Json kg;
  kg["energy_purchased_MJ"] = optional_number(r.per_kg(e.purchased_J / J_per_MJ));
  kg["energy_purchased_kWh"] = per_kg(r, e.purchased_J / J_per_kWh);
  kg["electricity_kWh"] = per_kg(r, (e.electricity_J + e.chiller_electricity_J) / J_per_kWh);
  kg["heat_kWh"] = per_kg(r, e.heat_J / J_per_kWh);
  kg["cooling_kWh"] = per_kg(r, e.cooling_J / J_per_kWh);
  kg["solvent_bought_kg"] = per_kg(r, r.solvent_bought_kg);
  kg["solvent_lost_kg"] = per_kg(r, r.solvent_lost_kg);
  kg["process_water_m3"] = per_kg(r, r.process_water_m3);
  kg["total_cost"] = per_kg(r, r.total_cost);
  kg["net_cost"] = per_kg(r, r.net_cost);
  kg["co2e_kg"] = per_kg(r, r.co2e_kg);
  Json wastes_per_kg = Json::object();
  for (const auto& w : r.wastes) wastes_per_kg[w.stream] = per_kg(r, w.mass_kg);
  kg["wastes_kg"] = wastes_per_kg;
  k["per_kg_monomer"] = kg;

  if (r.minimum_energy) {
    k["minimum_energy_MJ_per_kg"] = r.minimum_energy->per_kg_monomer_J / J_per_MJ;
    k["minimum_energy_kWh_per_kg"] = r.minimum_energy->per_kg_monomer_J / J_per_kWh;
    k["minimum_energy_reaction_temperature_K"] = r.minimum_energy->reaction_temperature_K;
  } else {
    k["minimum_energy_MJ_per_kg"] = nullptr;
  }
  k["efficiency_ratio"] = optional_number(r.efficiency_ratio);
  // From the discounted cash flow; null without an economics section.
  const auto* cf = r.cash_flow ? &*r.cash_flow : nullptr;
  k["npv"] = cf ? Json(cf->npv) : Json(nullptr);
  k["irr"] = cf ? optional_number(cf->irr) : Json(nullptr);
  k["payback_years"] = cf ? optional_number(cf->payback_years) : Json(nullptr);
  k["minimum_selling_price"] = cf ? optional_number(cf->minimum_selling_price) : Json(nullptr);

  Json blocks = Json::array();
  for (const auto& b : r.energy_by_block) {
    Json j;
    j["block"] = b.block;
    j["type"] = b.type;
    j["heat_kWh"] = b.heat_J / J_per_kWh;
    j["electricity_kWh"] = (b.electricity_J + b.chiller_electricity_J) / J_per_kWh;
    j["fuel_kWh"] = b.fuel_J / J_per_kWh;
    j["cooling_kWh"] = b.cooling_J / J_per_kWh;
    j["purchased_kWh"] = b.purchased_J / J_per_kWh;
    j["purchased_MJ_per_kg_monomer"] = optional_number(r.per_kg(b.purchased_J / J_per_MJ));
    blocks.push_back(j);
  }
  k["energy_by_block"] = blocks;

  Json wastes = Json::array();
  for (const auto& w : r.wastes) {
    Json j;
    j["stream"] = w.stream;
    j["class"] = w.waste_class;
    j["description"] = w.description;
    j["mass_kg"] = w.mass_kg;
    j["volume_m3"] = w.volume_m3;
    j["disposal_cost"] = w.priced ? Json(w.disposal_cost) : Json(nullptr);
    j["mass_kg_per_kg_monomer"] = per_kg(r, w.mass_kg);
    wastes.push_back(j);
  }
  k["wastes"] = wastes;
  return k;
}

Json costs_to_json(const Case& c, const costs::CostReport& r) {
  Json j;
  j["currency"] = c.currency;
  Json lines = Json::array();
  std::map<std::string, double> by_category;
  for (const auto& line : r.lines) {
    Json l;
    l["category"] = costs::cost_category_name(line.category);
    l["item"] = line.item;
    l["quantity"] = line.quantity;
    l["unit"] = line.unit;
    l["cost"] = line.cost;
    l["cost_per_kg_monomer"] = per_kg(r, line.cost);
    lines.push_back(l);
    by_category[costs::cost_category_name(line.category)] += line.cost;
  }
  j["lines"] = lines;
  Json categories = Json::object();
  for (const auto& [name, cost] : by_category) categories[name] = cost;
  j["by_category"] = categories;
  j["total_cost"] = r.total_cost;
  j["credits"] = r.total_credits;
  j["net_cost"] = r.net_cost;
  j["net_cost_per_kg_monomer"] = per_kg(r, r.net_cost);
  j["monomer_price_per_kg"] = optional_number(r.monomer_price);
  j["monomer_revenue"] = r.monomer_revenue;
  j["margin"] = r.margin;

  Json capital;
  Json items = Json::array();
  for (const auto& item : r.capital.items) {
    Json i;
    i["block"] = item.block;
    i["item"] = item.item;
    i["kind"] = item.kind;
    i["measure"] = item.measure;
    i["size"] = item.size;
    i["unit"] = item.unit;
    i["method"] = item.method;
    i["source"] = item.source;
    i["purchased_cost"] = item.purchased_cost;
    i["installation_factor"] = item.installation_factor;
    i["installed_cost"] = item.installed_cost;
    i["note"] = item.note;
    items.push_back(i);
  }
  capital["items"] = items;
  capital["purchased_total"] = r.capital.purchased_total;
  capital["installed_total"] = r.capital.installed_total;
  capital["capital_recovery_factor"] = r.capital.capital_recovery_factor;
  capital["annual_capital_charge"] = r.capital.annual_capital_charge;
  capital["capital_charge_per_basis"] = r.capital.capital_charge_per_batch;
  capital["warnings"] = r.capital.warnings;
  j["capital"] = capital;
  j["cash_flow"] = r.cash_flow ? cash_flow_to_json(*r.cash_flow) : Json(nullptr);
  j["missing_prices"] = r.missing_prices;
  j["notes"] = r.notes;
  return j;
}

}  // namespace unchain::app
