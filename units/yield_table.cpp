#include "units/yield_table.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/block_helpers.hpp"

namespace unchain::units {

namespace {

std::string key_path(const MappingReader& parameters, std::string_view key) {
  return parameters.path().empty() ? std::string(key) : parameters.path() + "." + std::string(key);
}

}  // namespace

YieldTable::YieldTable(std::vector<Temperature> temperatures, std::vector<std::string> products,
                       std::vector<std::vector<double>> fractions, std::string source)
    : products_(std::move(products)), fractions_(std::move(fractions)), source_(std::move(source)) {
  for (const Temperature& T : temperatures) temperatures_K_.push_back(in_kelvin(T));
  if (temperatures_K_.size() < 2)
    throw std::invalid_argument("a yield table needs at least two temperatures (found " +
                                std::to_string(temperatures_K_.size()) + ")");
  for (std::size_t i = 1; i < temperatures_K_.size(); ++i)
    if (!(temperatures_K_[i] > temperatures_K_[i - 1]))
      throw std::invalid_argument("the table temperatures must increase (entry " + std::to_string(i + 1) + ", " +
                                  format_celsius(kelvin(temperatures_K_[i])) + ", is not above " +
                                  format_celsius(kelvin(temperatures_K_[i - 1])) + ")");
  if (products_.empty()) throw std::invalid_argument("a yield table needs at least one product");
  if (fractions_.size() != products_.size())
    throw std::invalid_argument("a yield table needs one column of fractions per product");
  for (std::size_t j = 0; j < products_.size(); ++j) {
    if (fractions_[j].size() != temperatures_K_.size())
      throw std::invalid_argument("product '" + products_[j] + "' has " + std::to_string(fractions_[j].size()) +
                                  " fractions (expected one per temperature, " +
                                  std::to_string(temperatures_K_.size()) + ")");
    for (double w : fractions_[j])
      if (!(w >= 0.0) || w > 1.0)
        throw std::invalid_argument("product '" + products_[j] + "': fraction " + format_number(w) +
                                    " is outside 0 to 1");
  }
  for (std::size_t i = 0; i < temperatures_K_.size(); ++i) {
    double sum = 0.0;
    for (const auto& column : fractions_) sum += column[i];
    if (std::abs(sum - 1.0) > yield_sum_tolerance)
      throw std::invalid_argument("the fractions at " + format_celsius(kelvin(temperatures_K_[i])) + " sum to " +
                                  format_number(sum, 4) + " (expected 1 within " +
                                  format_number(yield_sum_tolerance) + ")");
    for (auto& column : fractions_) column[i] /= sum;
  }
}

bool YieldTable::can_evaluate(Temperature T) const {
  const double span = temperatures_K_.back() - temperatures_K_.front();
  const double T_K = in_kelvin(T);
  return T_K >= temperatures_K_.front() - yield_extrapolation_limit * span &&
         T_K <= temperatures_K_.back() + yield_extrapolation_limit * span;
}

std::vector<double> YieldTable::at(Temperature T, const std::string& who, Warnings& warnings) const {
  const double T_K = in_kelvin(T);
  const double low = temperatures_K_.front();
  const double high = temperatures_K_.back();
  if (!can_evaluate(T))
    throw ModelError(who + ": the yield table covers " + format_celsius(kelvin(low)) + " to " +
                     format_celsius(kelvin(high)) + "; " + format_celsius(T) +
                     " is more than 10 % of that span outside it (expected a table that covers the reactor "
                     "temperature)");
  if (T_K < low || T_K > high)
    warnings.add(who + ": yields extrapolated from the yield table (" + format_celsius(kelvin(low)) + " to " +
                 format_celsius(kelvin(high)) + ") to " + format_celsius(T));
  // The segment holding T, or the end segment for an extrapolation.
  std::size_t i = 0;
  while (i + 2 < temperatures_K_.size() && T_K > temperatures_K_[i + 1]) ++i;
  const double t = (T_K - temperatures_K_[i]) / (temperatures_K_[i + 1] - temperatures_K_[i]);
  std::vector<double> out;
  out.reserve(products_.size());
  bool clipped = false;
  for (const auto& column : fractions_) {
    double w = column[i] + t * (column[i + 1] - column[i]);
    if (w < 0.0) {
      w = 0.0;
      clipped = true;
    }
    out.push_back(w);
  }
  if (clipped) {
    double sum = 0.0;
    for (double w : out) sum += w;
    for (double& w : out) w /= sum;
    warnings.add(who + ": an extrapolated yield fell below zero at " + format_celsius(T) +
                 "; it is set to zero and the other yields renormalized");
  }
  return out;
}

std::optional<YieldTable> read_yield_table(MappingReader& parameters, std::string_view key,
                                           const ComponentSet& components) {
  if (!parameters.has(key)) {
    parameters.accept(key);
    return std::nullopt;
  }
  const YAML::Node node = parameters.raw(key);
  const std::string path = key_path(parameters, key);
  if (!node.IsMap()) {
    parameters.error(key, "'" + path + "' must be a mapping (expected temperatures: [...] and one list of mass "
                                       "fractions per product)");
    return std::nullopt;
  }
  MappingReader table(node, parameters.file(), path, parameters.diagnostics(), parameters.currency());
  DiagnosticList& diagnostics = parameters.diagnostics();
  bool ok = true;

  std::vector<Temperature> temperatures;
  const YAML::Node temps = table.raw("temperatures");
  if (!temps.IsDefined() || !temps.IsSequence()) {
    table.error(temps.IsDefined() ? "temperatures" : "",
                "'" + path + ".temperatures' must be a list of temperatures such as [\"450 degC\", \"500 degC\"]");
    ok = false;
  } else {
    for (std::size_t i = 0; i < temps.size(); ++i) {
      auto T = read_quantity_node<Temperature>(temps[i], parameters.file(),
                                               path + ".temperatures[" + std::to_string(i) + "]", diagnostics);
      if (T) temperatures.push_back(*T);
      else ok = false;
    }
  }
  const std::string source = table.text("source", "given in the case");

  std::vector<std::string> ids;
  for (const auto& c : components.components()) ids.push_back(c.id);
  std::vector<std::string> products;
  std::vector<std::vector<double>> fractions;
  for (const auto& item : node) {
    const std::string name = item.first.Scalar();
    if (name == "temperatures" || name == "source") continue;
    table.accept(name);
    const std::string column_path = path + "." + name;
    if (!components.index_of(name)) {
      const std::string suggestion = closest_match(name, ids);
      diagnostics.error(location_of(item.first, parameters.file()),
                        "'" + column_path + "': product '" + name + "' is not among the case's components" +
                            (suggestion.empty() ? std::string() : " (did you mean '" + suggestion + "'?)"));
      ok = false;
      continue;
    }
    if (!item.second.IsSequence()) {
      diagnostics.error(location_of(item.second, parameters.file()),
                        "'" + column_path + "' must be a list of mass fractions, one per temperature");
      ok = false;
      continue;
    }
    std::vector<double> column;
    for (std::size_t i = 0; i < item.second.size(); ++i) {
      const YAML::Node v = item.second[i];
      double w = 0.0;
      bool number = v.IsScalar();
      if (number) {
        try {
          w = v.as<double>();
        } catch (const YAML::Exception&) {
          number = false;
        }
      }
      if (!number) {
        diagnostics.error(location_of(v, parameters.file()), "'" + column_path + "[" + std::to_string(i) +
                                                                 "]' must be a mass fraction (expected a plain "
                                                                 "number from 0 to 1)");
        ok = false;
      }
      column.push_back(w);
    }
    products.push_back(name);
    fractions.push_back(std::move(column));
  }
  table.finish();
  if (!ok) return std::nullopt;
  try {
    return YieldTable(std::move(temperatures), std::move(products), std::move(fractions), source);
  } catch (const std::invalid_argument& e) {
    parameters.error(key, "'" + path + "': " + e.what());
    return std::nullopt;
  }
}

}  // namespace unchain::units
