#include "app/csv_tables.hpp"

#include <filesystem>
#include <sstream>

#include "app/atomic_file.hpp"
#include "app/exit_codes.hpp"

namespace unchain::app {

std::string csv_field(const std::string& text) {
  if (text.find_first_of(",\"\n\r") == std::string::npos) return text;
  std::string out = "\"";
  for (char ch : text) {
    if (ch == '"') out += '"';
    out += ch;
  }
  return out + "\"";
}

std::string csv_number(double value) {
  std::ostringstream out;
  out.precision(12);
  out << value;
  return out.str();
}

namespace {

class CsvTable {
 public:
  explicit CsvTable(std::initializer_list<std::string> headings) { row(std::vector<std::string>(headings)); }
  void row(const std::vector<std::string>& fields) {
    for (std::size_t i = 0; i < fields.size(); ++i) text_ += (i ? "," : "") + csv_field(fields[i]);
    text_ += "\n";
  }
  [[nodiscard]] const std::string& text() const { return text_; }

 private:
  std::string text_;
};

std::string optional_number(const std::optional<double>& v) { return v ? csv_number(*v) : std::string(); }

}  // namespace

void write_csv_tables(const std::string& folder, const Case& c, const SolveResult& result,
                      const costs::CostReport& report) {
  namespace fs = std::filesystem;
  if (!fs::is_directory(folder)) throw OutputFileError("CSV folder '" + folder + "' does not exist (expected a folder)");
  const std::string amount = c.basis == Basis::batch ? "kg_per_batch" : "kg_per_hour";
  const std::string energy = c.basis == Basis::batch ? "per_batch" : "per_hour";
  const std::string cur = c.currency;

  CsvTable streams({"stream", "source", "destination", "phase", "component", "mass_" + amount, "temperature_K",
                    "pressure_Pa"});
  for (std::size_t s = 0; s < c.streams.size(); ++s) {
    const StreamInfo& info = c.streams[s];
    const Stream& stream = result.streams[s];
    const std::string source = info.source ? c.blocks[*info.source].name : std::string("(feed)");
    const std::string destination = info.destination ? c.blocks[*info.destination].name : std::string("(product)");
    for (Phase phase : all_phases) {
      const Eigen::VectorXd& m = stream.phase_masses(phase);
      for (std::size_t i = 0; i < stream.size(); ++i) {
        if (m[static_cast<Eigen::Index>(i)] == 0.0) continue;
        streams.row({info.name, source, destination, phase_name(phase), stream.components()[i].id,
                     csv_number(m[static_cast<Eigen::Index>(i)]), csv_number(in_kelvin(stream.temperature())),
                     csv_number(to_si(stream.pressure()))});
      }
    }
  }

  CsvTable blocks({"block", "type", "process_heat_J_" + energy, "heat_drawn_J_" + energy, "electricity_J_" + energy,
                   "cooling_J_" + energy, "duration_s", "mass_relative_error", "energy_relative_error"});
  CsvTable figures({"block", "figure", "value", "unit", "description"});
  for (const BlockResult& b : result.blocks) {
    blocks.row({b.name, b.type, csv_number(b.resources.process_heat_J), csv_number(b.resources.heat_drawn_J),
                csv_number(b.resources.electricity_J), csv_number(b.resources.cooling_J),
                csv_number(b.resources.duration_s), csv_number(b.balance.mass_relative_error),
                csv_number(b.balance.energy_relative_error)});
    for (const BlockFigure& f : b.resources.figures)
      figures.row({b.name, f.key, csv_number(f.value), f.unit, f.description});
  }

  CsvTable energy_table({"block", "type", "heat_kWh_" + energy, "electricity_kWh_" + energy, "fuel_kWh_" + energy,
                         "cooling_kWh_" + energy, "purchased_kWh_" + energy, "purchased_MJ_per_kg_monomer"});
  for (const auto& e : report.energy_by_block)
    energy_table.row({e.block, e.type, csv_number(e.heat_J / 3.6e6),
                      csv_number((e.electricity_J + e.chiller_electricity_J) / 3.6e6), csv_number(e.fuel_J / 3.6e6),
                      csv_number(e.cooling_J / 3.6e6), csv_number(e.purchased_J / 3.6e6),
                      optional_number(report.per_kg(e.purchased_J / 1e6))});

  CsvTable cost_table({"category", "item", "quantity", "quantity_unit", "cost_" + cur + "_" + energy,
                       "cost_" + cur + "_per_kg_monomer"});
  for (const auto& l : report.lines)
    cost_table.row({costs::cost_category_name(l.category), l.item, csv_number(l.quantity), l.unit, csv_number(l.cost),
                    optional_number(report.per_kg(l.cost))});

  CsvTable wastes({"stream", "class", "mass_" + amount, "volume_m3_" + energy, "mass_kg_per_kg_monomer",
                   "disposal_cost_" + cur + "_" + energy, "contents"});
  for (const auto& w : report.wastes)
    wastes.row({w.stream, w.waste_class, csv_number(w.mass_kg), csv_number(w.volume_m3),
                optional_number(report.per_kg(w.mass_kg)), w.priced ? csv_number(w.disposal_cost) : std::string(),
                w.description});

  CsvTable kpis({"figure", "value_" + energy, "unit", "value_per_kg_monomer", "unit_per_kg_monomer"});
  const auto& t = report.energy_total;
  auto kpi = [&](const std::string& name, double value, const std::string& unit, const std::string& per_kg_unit) {
    kpis.row({name, csv_number(value), unit, optional_number(report.per_kg(value)), per_kg_unit});
  };
  kpi("monomer", report.monomer_kg.value_or(0.0), "kg", "kg/kg");
  kpi("polymer_fed", report.polymer_fed_kg, "kg", "kg/kg");
  kpi("energy_purchased", t.purchased_J / 1e6, "MJ", "MJ/kg");
  kpi("energy_purchased_kWh", t.purchased_J / 3.6e6, "kWh", "kWh/kg");
  kpi("electricity", (t.electricity_J + t.chiller_electricity_J) / 3.6e6, "kWh", "kWh/kg");
  kpi("heat_drawn", t.heat_J / 3.6e6, "kWh", "kWh/kg");
  kpi("cooling", t.cooling_J / 3.6e6, "kWh", "kWh/kg");
  kpi("solvent_bought", report.solvent_bought_kg, "kg", "kg/kg");
  kpi("solvent_recovered", report.solvent_recovered_kg, "kg", "kg/kg");
  kpi("solvent_lost", report.solvent_lost_kg, "kg", "kg/kg");
  kpi("process_water", report.process_water_m3, "m3", "m3/kg");
  kpi("total_cost", report.total_cost, cur, cur + "/kg");
  kpi("credits", report.total_credits, cur, cur + "/kg");
  kpi("net_cost", report.net_cost, cur, cur + "/kg");
  kpi("co2e", report.co2e_kg, "kg", "kg/kg");
  if (report.minimum_energy)
    kpis.row({"minimum_energy", "", "", csv_number(report.minimum_energy->per_kg_monomer_J / 1e6), "MJ/kg"});

  // The discounted cash flow, one row per year (only the headings when the
  // case has no economics section or no priced monomer).
  CsvTable cash_flow({"t_yr", "operating_year", "capacity_fraction", "revenue_" + cur, "operating_cost_" + cur,
                      "depreciation_" + cur, "taxable_income_" + cur, "tax_" + cur, "loss_carried_forward_" + cur,
                      "capital_" + cur, "net_cash_flow_" + cur, "discounted_cash_flow_" + cur,
                      "cumulative_discounted_" + cur});
  if (report.cash_flow) {
    for (const auto& y : report.cash_flow->years)
      cash_flow.row({std::to_string(y.year), std::to_string(y.operating_year), csv_number(y.capacity),
                     csv_number(y.revenue), csv_number(y.operating_cost), csv_number(y.depreciation),
                     csv_number(y.taxable_income), csv_number(y.tax), csv_number(y.loss_carried_forward),
                     csv_number(y.capital), csv_number(y.net_cash_flow), csv_number(y.discounted_cash_flow),
                     csv_number(y.cumulative_discounted)});
  }

  const fs::path dir(folder);
  write_output_file((dir / "streams.csv").string(), streams.text());
  write_output_file((dir / "blocks.csv").string(), blocks.text());
  write_output_file((dir / "block_figures.csv").string(), figures.text());
  write_output_file((dir / "energy.csv").string(), energy_table.text());
  write_output_file((dir / "costs.csv").string(), cost_table.text());
  write_output_file((dir / "wastes.csv").string(), wastes.text());
  write_output_file((dir / "kpis.csv").string(), kpis.text());
  write_output_file((dir / "cash_flow.csv").string(), cash_flow.text());
}

}  // namespace unchain::app
