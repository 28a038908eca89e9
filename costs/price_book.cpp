#include "costs/price_book.hpp"

#include <algorithm>
#include <filesystem>

namespace unchain::costs {

const PurityGrade* PriceBook::grade_for(const std::string& component, double purity) const {
  auto it = products.find(component);
  if (it == products.end()) return nullptr;
  const PurityGrade* best = nullptr;
  for (const auto& g : it->second)
    if (purity >= g.minimum_purity && (best == nullptr || g.minimum_purity > best->minimum_purity)) best = &g;
  return best;
}

namespace {

template <class Q>
void read_optional(MappingReader& m, std::string_view key, std::optional<Q>& target) {
  if (auto v = m.optional_quantity<Q>(key)) target = *v;
}

void read_price_map(MappingReader& m, std::string_view key, std::map<std::string, PricePerMass>& target) {
  auto section = m.optional_mapping(key);
  if (!section) return;
  for (const auto& item : section->node()) {
    const std::string id = item.first.Scalar();
    if (auto v = section->optional_quantity<PricePerMass>(id)) target[id] = *v;
  }
  section->finish();
}

void read_products(MappingReader& m, PriceBook& book) {
  YAML::Node node = m.raw("products");
  if (!node.IsDefined() || node.IsNull()) return;
  if (!node.IsMap()) {
    m.error("products", "'" + m.path() + ".products' must map component ids to lists of purity grades");
    return;
  }
  for (const auto& item : node) {
    const std::string id = item.first.Scalar();
    const std::string path = m.path() + ".products." + id;
    if (!item.second.IsSequence()) {
      m.diagnostics().error(location_of(item.second, m.file()),
                            "'" + path + "' must be a list of {minimum_purity, price} grades");
      continue;
    }
    std::vector<PurityGrade> grades;
    std::size_t index = 0;
    for (const auto& g : item.second) {
      MappingReader grade(g, m.file(), path + "[" + std::to_string(index++) + "]", m.diagnostics(), m.currency());
      if (!grade.is_valid()) continue;
      PurityGrade pg;
      pg.minimum_purity = grade.number_in("minimum_purity", 0.0, 0.0, 1.0);
      pg.price = grade.quantity<PricePerMass>("price");
      grade.finish();
      grades.push_back(pg);
    }
    std::sort(grades.begin(), grades.end(),
              [](const PurityGrade& a, const PurityGrade& b) { return a.minimum_purity > b.minimum_purity; });
    book.products[id] = std::move(grades);
  }
}

void read_section(MappingReader& m, PriceBook& book) {
  read_optional(m, "electricity", book.electricity);
  read_optional(m, "fuel", book.fuel);
  book.burner_efficiency = m.number_in("burner_efficiency", book.burner_efficiency, 0.05, 1.0);
  if (auto cooling = m.optional_text("cooling")) {
    if (*cooling == "cooling_water") book.cooling = CoolingSupply::cooling_water;
    else if (*cooling == "chiller") book.cooling = CoolingSupply::chiller;
    else m.error("cooling", "'" + m.path() + ".cooling' must be cooling_water or chiller (found " + *cooling + ")");
  }
  read_optional(m, "cooling_water", book.cooling_water);
  book.cooling_water_temperature_rise =
      m.quantity<TemperatureDifference>("cooling_water_temperature_rise", book.cooling_water_temperature_rise);
  book.chiller_coefficient_of_performance =
      m.number_in("chiller_coefficient_of_performance", book.chiller_coefficient_of_performance, 0.5, 15.0);
  read_price_map(m, "solvents", book.solvents);
  read_optional(m, "process_water", book.process_water);
  read_optional(m, "wastewater_disposal", book.wastewater_disposal);
  read_optional(m, "solid_waste_disposal", book.solid_waste_disposal);
  read_optional(m, "hazardous_waste_disposal", book.hazardous_waste_disposal);
  read_optional(m, "inert_gas", book.inert_gas);
  read_optional(m, "inhibitor", book.inhibitor);
  book.inhibitor_dose = m.number_in("inhibitor_dose", book.inhibitor_dose, 0.0, 0.1);
  read_optional(m, "labour_rate", book.labour_rate);
  book.labour_hours_per_batch = m.quantity<Time>("labour_hours_per_batch", book.labour_hours_per_batch);
  read_products(m, book);
  read_optional(m, "byproduct_fuel_value", book.byproduct_fuel_value);
  read_price_map(m, "byproduct_chemicals", book.byproduct_chemicals);
  read_optional(m, "gate_fee", book.gate_fee);
  read_optional(m, "grid_emission_factor", book.grid_emission_factor);
  read_optional(m, "fuel_emission_factor", book.fuel_emission_factor);
}

// The prices of the shared file alone: everything it reports goes to
// `diagnostics` (with the file's own locations).
PriceBook read_price_file(const std::string& path, const std::string& currency, DiagnosticList& diagnostics) {
  PriceBook book;
  book.currency = currency;
  try {
    const YamlDocument shared = load_yaml_file(path);
    MappingReader shared_prices(shared.root["prices"].IsDefined() ? shared.root["prices"] : shared.root,
                                shared.file, "prices", diagnostics, currency);
    if (shared_prices.is_valid()) {
      read_section(shared_prices, book);
      shared_prices.finish();
    }
  } catch (const InputError& e) {
    for (const auto& d : e.diagnostics()) diagnostics.error(d.where, d.message);
  }
  return book;
}

std::string price_file_path(const std::string& case_file, const std::string& file) {
  return (std::filesystem::path(case_file).parent_path() / file).string();
}

void replay(const std::vector<Diagnostic>& items, DiagnosticList& diagnostics) {
  for (const auto& d : items) {
    if (d.severity == Severity::error) diagnostics.error(d.where, d.message);
    else diagnostics.warning(d.where, d.message);
  }
}

}  // namespace

std::optional<SharedPriceFile> read_shared_price_file(const YAML::Node& document, const std::string& case_file,
                                                      const std::string& currency) {
  if (!document.IsMap()) return std::nullopt;
  const YAML::Node prices = document["prices"];
  if (!prices.IsDefined() || !prices.IsMap()) return std::nullopt;
  const YAML::Node file = prices["file"];
  if (!file.IsDefined() || !file.IsScalar()) return std::nullopt;
  SharedPriceFile shared;
  shared.path = price_file_path(case_file, file.Scalar());
  shared.currency = currency;
  DiagnosticList diagnostics;
  shared.book = read_price_file(shared.path, currency, diagnostics);
  shared.diagnostics = diagnostics.all();
  return shared;
}

PriceBook read_price_book(const YAML::Node& document, const std::string& case_file, const std::string& currency,
                          DiagnosticList& diagnostics, const SharedPriceFile* shared) {
  PriceBook book;
  book.currency = currency;
  if (!document.IsMap()) return book;
  MappingReader prices(document["prices"], case_file, "prices", diagnostics, currency);
  if (!prices.is_valid()) return book;
  if (auto file = prices.optional_text("file")) {
    const std::string path = price_file_path(case_file, *file);
    if (shared != nullptr && shared->path == path && shared->currency == currency) {
      book = shared->book;
      replay(shared->diagnostics, diagnostics);
    } else {
      book = read_price_file(path, currency, diagnostics);
    }
  }
  read_section(prices, book);
  prices.finish();
  return book;
}

}  // namespace unchain::costs
