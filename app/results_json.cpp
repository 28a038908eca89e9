#include "app/results_json.hpp"

#include <cmath>
#include <stdexcept>

namespace unchain::app {

namespace {

Json masses_by_id(const ComponentSet& components, const Eigen::VectorXd& masses) {
  Json out = Json::object();
  for (std::size_t i = 0; i < components.size() && i < static_cast<std::size_t>(masses.size()); ++i)
    out[components[i].id] = masses[static_cast<Eigen::Index>(i)];
  return out;
}

void collect_non_finite(const Json& j, const std::string& path, std::vector<std::string>& out) {
  if (j.is_number_float()) {
    if (!std::isfinite(j.get<double>())) out.push_back(path);
  } else if (j.is_object()) {
    for (const auto& [key, value] : j.items()) collect_non_finite(value, path.empty() ? key : path + "." + key, out);
  } else if (j.is_array()) {
    for (std::size_t i = 0; i < j.size(); ++i) collect_non_finite(j[i], path + "[" + std::to_string(i) + "]", out);
  }
}

Json name_or_null(const Case& c, const std::optional<std::size_t>& block) {
  if (!block || *block >= c.blocks.size()) return nullptr;
  return c.blocks[*block].name;
}

}  // namespace

Json balance_to_json(const BalanceClosure& balance) {
  Json elements = Json::object();
  for (const auto& [element, error] : balance.element_relative_error) elements[element] = error;
  return Json{{"mass_in_kg", balance.mass_in_kg},
              {"mass_out_kg", balance.mass_out_kg},
              {"mass_relative_error", balance.mass_relative_error},
              {"element_relative_error", elements},
              {"enthalpy_in_J", balance.enthalpy_in_J},
              {"heat_and_work_in_J", balance.heat_and_work_in_J},
              {"enthalpy_out_J", balance.enthalpy_out_J},
              {"energy_relative_error", balance.energy_relative_error}};
}

Json stream_to_json(const Case& c, std::size_t stream_index, const Stream& stream) {
  const StreamInfo& info = c.streams.at(stream_index);
  Json out{{"source", name_or_null(c, info.source)},
           {"source_port", info.source ? Json(info.source_role) : Json(nullptr)},
           {"destination", name_or_null(c, info.destination)},
           {"destination_port", info.destination ? Json(info.destination_role) : Json(nullptr)},
           {"temperature_K", in_kelvin(stream.temperature())},
           {"pressure_Pa", to_si(stream.pressure())}};
  if (stream.has_components()) {
    const ComponentSet& components = stream.components();
    out["components_kg"] = masses_by_id(components, stream.component_masses());
    Json phases = Json::object();
    for (Phase phase : all_phases) phases[phase_name(phase)] = masses_by_id(components, stream.phase_masses(phase));
    out["phases"] = phases;
  } else {
    out["components_kg"] = Json::object();
    out["phases"] = Json::object();
  }
  out["total_kg"] = to_si(stream.total_mass());
  if (auto density = stream.bulk_density()) out["bulk_density_kg_per_m3"] = to_si(*density);
  return out;
}

Json block_to_json(const BlockResult& block) {
  const BlockResources& r = block.resources;
  Json figures = Json::object();
  for (const auto& f : r.figures)
    figures[f.key] = Json{{"value", f.value}, {"unit", f.unit}, {"description", f.description}};
  Json materials = Json::array();
  for (const auto& m : r.materials)
    materials.push_back(Json{{"name", m.name}, {"kind", m.kind}, {"amount", m.amount}, {"unit", m.unit}});
  Json equipment = Json::array();
  for (const auto& e : r.equipment)
    equipment.push_back(
        Json{{"item", e.item}, {"kind", e.kind}, {"measure", e.measure}, {"size", e.size}, {"unit", e.unit}});
  return Json{{"type", block.type},
              {"heat_J", r.heat_drawn_J},
              {"electricity_J", r.electricity_J},
              {"cooling_J", r.cooling_J},
              {"process_heat_J", r.process_heat_J},
              {"work_to_streams_J", r.work_to_streams_J},
              {"duration_s", r.duration_s},
              {"heat_source", r.heat_source},
              {"figures", figures},
              {"materials", materials},
              {"equipment", equipment},
              {"cautions", r.cautions},
              {"balance", balance_to_json(block.balance)}};
}

Json results_to_json(const Case& c, const SolveResult& result, const std::vector<std::string>& cautions) {
  Json doc = Json::object();
  doc["schema_version"] = results_schema_version;
  doc["case"] = Json{{"title", c.title}, {"description", c.description}, {"file", c.file}};
  doc["basis"] = basis_name(c.basis);
  doc["amount_unit"] = c.basis == Basis::batch ? "kg per batch" : "kg per hour";
  doc["currency"] = c.currency;
  doc["converged"] = result.converged;

  Json loops = Json::array();
  for (const auto& loop : result.loops)
    loops.push_back(Json{{"blocks", loop.blocks},
                         {"tear_streams", loop.tear_streams},
                         {"iterations", loop.iterations},
                         {"converged", loop.converged},
                         {"residual_history", loop.residual_history}});
  doc["solver"] = Json{{"iterations", result.iterations},
                       {"tear_streams", result.tear_streams},
                       {"calculation_order", result.calculation_order},
                       {"loops", loops}};

  Json streams = Json::object();
  for (std::size_t i = 0; i < c.streams.size() && i < result.streams.size(); ++i)
    streams[c.streams[i].name] = stream_to_json(c, i, result.streams[i]);
  doc["streams"] = streams;

  Json blocks = Json::object();
  for (const auto& b : result.blocks) blocks[b.name] = block_to_json(b);
  doc["blocks"] = blocks;

  doc["balance"] = balance_to_json(result.overall);
  doc["warnings"] = result.warnings;
  doc["cautions"] = cautions;
  return doc;
}

std::vector<std::string> non_finite_json_fields(const Json& doc) {
  std::vector<std::string> out;
  collect_non_finite(doc, "", out);
  return out;
}

void require_finite_json(const Json& doc) {
  const std::vector<std::string> fields = non_finite_json_fields(doc);
  if (fields.empty()) return;
  throw std::logic_error("internal: the results field '" + fields.front() + "' is not finite" +
                         (fields.size() > 1 ? " (and " + std::to_string(fields.size() - 1) + " more)" : "") +
                         "; nothing was written");
}

}  // namespace unchain::app
