#include "costs/capital.hpp"

#include <cmath>
#include <sstream>

#include "costs/equipment_correlations.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::costs {

double scale_cost(double reference_cost, double reference_size, double size, double exponent) {
  if (!(reference_size > 0.0)) throw std::invalid_argument("reference size must be positive");
  return reference_cost * std::pow(size / reference_size, exponent);
}

double capital_recovery_factor(double interest_rate, double years) {
  if (!(years > 0.0)) throw std::invalid_argument("equipment life must be positive");
  if (std::abs(interest_rate) < 1e-12) return 1.0 / years;
  const double growth = std::pow(1.0 + interest_rate, years);
  return interest_rate * growth / (growth - 1.0);
}

double lang_factor(PlantType type) {
  switch (type) {
    case PlantType::solid: return 3.10;
    case PlantType::solid_fluid: return 3.63;
    case PlantType::fluid: return 4.74;
  }
  return 3.63;
}

namespace {

// The dimension each measure's sizes are given in.
std::optional<Dimension> measure_dimension(const std::string& measure) {
  if (measure == "volume") return dimension_of<Volume>();
  if (measure == "power") return dimension_of<Power>();
  if (measure == "area") return dimension_of<Area>();
  if (measure == "diameter") return dimension_of<Length>();
  if (measure == "mass") return dimension_of<Mass>();
  if (measure == "throughput") return dimension_of<MassFlow>();
  if (measure == "stages") return Dimension{};
  return std::nullopt;
}

}  // namespace

CapitalSettings read_capital_settings(const Case& c, DiagnosticList& diagnostics) {
  CapitalSettings s;
  if (!c.document.IsMap() || !c.document["capital"].IsDefined()) return s;
  MappingReader m(c.document["capital"], c.file, "capital", diagnostics, c.currency);
  if (!m.is_valid()) return s;
  s.present = true;
  s.cost_year = static_cast<int>(m.number_in("cost_year", s.cost_year, 1950, 2100));
  if (auto idx = m.optional_mapping("cost_index")) {
    for (const auto& item : idx->node()) {
      const std::string key = item.first.Scalar();
      idx->accept(key);
      try {
        s.index.set(std::stoi(key), item.second.as<double>());
      } catch (const std::exception&) {
        diagnostics.error(location_of(item.first, c.file),
                          "'capital.cost_index." + key + "': expected a year and a positive index value");
      }
    }
    idx->finish();
  }
  if (auto type = m.optional_text("plant_type")) {
    if (*type == "solid") s.plant_type = PlantType::solid;
    else if (*type == "solid_fluid") s.plant_type = PlantType::solid_fluid;
    else if (*type == "fluid") s.plant_type = PlantType::fluid;
    else m.error("plant_type", "'capital.plant_type' must be solid, solid_fluid or fluid (found " + *type + ")");
  }
  s.installation_factor = m.optional_number_in("installation_factor", 1.0, 10.0);
  s.interest_rate = m.number_in("interest_rate", s.interest_rate, 0.0, 1.0);
  s.equipment_life_years = to_si(m.quantity<Time>("equipment_life", seconds(10 * 365.25 * 86400))) / (365.25 * 86400);
  s.batches_per_year = m.number_in("batches_per_year", s.batches_per_year, 1.0, 1e6);
  s.operating_hours_per_year = to_si(m.quantity<Time>("operating_time_per_year", seconds(8000 * 3600.0))) / 3600.0;

  YAML::Node items = m.raw("equipment");
  if (items.IsDefined() && items.IsSequence()) {
    std::size_t index = 0;
    for (const auto& item : items) {
      MappingReader e(item, c.file, "capital.equipment[" + std::to_string(index++) + "]", diagnostics, c.currency);
      if (!e.is_valid()) continue;
      EquipmentPrice p;
      p.block = e.text("block");
      if (!p.block.empty() && !c.block_index(p.block))
        e.error("block", "'" + e.path() + ".block': unknown block '" + p.block + "'");
      p.item = e.text("item", "");
      p.measure = e.text("measure");
      p.correlation = e.optional_text("correlation");
      if (p.correlation) {
        if (find_correlation(*p.correlation) == nullptr)
          e.error("correlation", "'" + e.path() + ".correlation': unknown correlation '" + *p.correlation + "'");
      } else {
        p.reference_cost = to_si(e.quantity<Money>("reference_cost"));
        const auto dim = measure_dimension(p.measure);
        if (!dim) {
          e.error("measure", "'" + e.path() + ".measure' must be volume, power, area, diameter, mass, throughput "
                                               "or stages (found " + p.measure + ")");
        } else if (e.has("reference_size")) {
          e.accept("reference_size");
          try {
            const ParsedQuantity q = parse_quantity(e.node()["reference_size"].Scalar());
            if (!(q.dimension == *dim))
              e.error("reference_size", "'" + e.path() + ".reference_size': wrong dimension (expected " +
                                            dim->describe() + ", found " + q.dimension.describe() + ")");
            p.reference_size = q.si_value();
            if (!(p.reference_size > 0.0))
              e.error("reference_size", "'" + e.path() + ".reference_size' must be positive");
          } catch (const UnitError& err) {
            e.error("reference_size", "'" + e.path() + ".reference_size': " + err.what());
          }
        } else {
          e.error({}, "missing required key '" + e.path() + ".reference_size'");
        }
        p.reference_year = static_cast<int>(e.number_in("reference_year", s.cost_year, 1950, 2100));
        p.exponent = e.number_in("exponent", 0.6, 0.1, 1.5);
      }
      p.installation_factor = e.optional_number_in("installation_factor", 1.0, 10.0);
      e.finish();
      s.prices.push_back(p);
    }
  } else if (items.IsDefined() && !items.IsNull()) {
    m.error("equipment", "'capital.equipment' must be a list");
  }
  m.finish();
  return s;
}

CapitalEstimate estimate_capital(const Case& c, const SolveResult& result, const CapitalSettings& settings) {
  CapitalEstimate estimate;
  const double default_factor = settings.installation_factor.value_or(lang_factor(settings.plant_type));
  for (std::size_t b = 0; b < result.blocks.size(); ++b) {
    const BlockResult& block = result.blocks[b];
    bool first_of_measure_taken = false;
    for (const EquipmentSize& eq : block.resources.equipment) {
      CostedItem item;
      item.block = block.name;
      item.item = eq.item;
      item.kind = eq.kind;
      item.measure = eq.measure;
      item.size = eq.size;
      item.unit = eq.unit;
      item.installation_factor = default_factor;
      const EquipmentPrice* price = nullptr;
      for (const auto& p : settings.prices) {
        if (p.block != block.name || p.measure != eq.measure) continue;
        if (!p.item.empty() && p.item != eq.item) continue;
        if (p.item.empty() && first_of_measure_taken) continue;
        price = &p;
        break;
      }
      if (price != nullptr && price->item.empty()) first_of_measure_taken = true;
      const CostCorrelation* correlation = nullptr;
      if (price != nullptr && price->correlation) correlation = find_correlation(*price->correlation);
      else if (price == nullptr) correlation = default_correlation(eq.kind, eq.measure);
      try {
        if (price != nullptr && !price->correlation) {
          const double scaled = scale_cost(price->reference_cost, price->reference_size, eq.size, price->exponent);
          item.purchased_cost = scaled * settings.index.escalation(price->reference_year, settings.cost_year);
          std::ostringstream method;
          method << "user price scaled by exponent " << price->exponent << " from " << price->reference_year;
          item.method = method.str();
          item.source = "case file";
        } else if (correlation != nullptr && price == nullptr && !correlation->in_range(eq.size)) {
          // A default correlation is not stretched beyond its range (a
          // furnace correlation for a 450 W heating mantle would be absurd).
          std::ostringstream note;
          note << "no price given; the default correlation '" << correlation->name << "' covers "
               << correlation->low << " to " << correlation->high << " " << correlation->size_unit << ", this item is "
               << eq.size * correlation->size_scale << " " << correlation->size_unit;
          item.method = "not costed";
          item.note = note.str();
        } else if (correlation != nullptr) {
          if (correlation->currency != c.currency) {
            item.method = "not costed";
            item.note = "correlation '" + correlation->name + "' is in " + correlation->currency +
                        ", the case in " + c.currency + "; give a price in the case currency";
          } else {
            item.purchased_cost =
                correlation->cost(eq.size) * settings.index.escalation(correlation->basis_year, settings.cost_year);
            item.method = correlation->name;
            item.source = correlation->source;
            if (!correlation->in_range(eq.size)) {
              std::ostringstream note;
              note << "size " << eq.size * correlation->size_scale << " " << correlation->size_unit
                   << " outside the correlation's range " << correlation->low << " to " << correlation->high
                   << "; give a price for this item";
              item.note = note.str();
              estimate.warnings.push_back(block.name + " / " + eq.item + ": " + item.note);
            }
          }
        } else {
          item.method = "not costed";
          item.note = "no price given and no published correlation for " + eq.kind + " by " + eq.measure;
        }
      } catch (const std::exception& e) {
        item.method = "not costed";
        item.note = e.what();
        estimate.warnings.push_back(block.name + " / " + eq.item + ": " + e.what());
      }
      if (price != nullptr && price->installation_factor) item.installation_factor = *price->installation_factor;
      item.installed_cost = item.purchased_cost * item.installation_factor;
      estimate.purchased_total += item.purchased_cost;
      estimate.installed_total += item.installed_cost;
      estimate.items.push_back(item);
    }
  }
  estimate.capital_recovery_factor = capital_recovery_factor(settings.interest_rate, settings.equipment_life_years);
  estimate.annual_capital_charge = estimate.installed_total * estimate.capital_recovery_factor;
  estimate.capital_charge_per_batch = c.basis == Basis::batch
                                          ? estimate.annual_capital_charge / settings.batches_per_year
                                          : estimate.annual_capital_charge / settings.operating_hours_per_year;
  return estimate;
}

}  // namespace unchain::costs
