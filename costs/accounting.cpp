#include "costs/accounting.hpp"

#include "flowsheet/yaml_reader.hpp"

namespace unchain::costs {

const char* waste_class_name(WasteClass c) {
  switch (c) {
    case WasteClass::solid_residue: return "solid_residue";
    case WasteClass::aqueous: return "aqueous";
    case WasteClass::vent_gas: return "vent_gas";
    case WasteClass::distillation_bottoms: return "distillation_bottoms";
    case WasteClass::fore_cut: return "fore_cut";
    case WasteClass::dust: return "dust";
    case WasteClass::other: return "other";
  }
  return "other";
}

namespace {

const std::vector<std::string>& waste_class_names() {
  static const std::vector<std::string> names{"solid_residue", "aqueous", "vent_gas", "distillation_bottoms",
                                              "fore_cut", "dust", "other"};
  return names;
}

std::optional<WasteClass> parse_waste_class(const std::string& s) {
  const auto& names = waste_class_names();
  for (std::size_t i = 0; i < names.size(); ++i)
    if (names[i] == s) return static_cast<WasteClass>(i);
  return std::nullopt;
}

std::vector<std::string> read_id_list(MappingReader& m, std::string_view key) {
  std::vector<std::string> out;
  YAML::Node n = m.raw(key);
  if (!n.IsDefined() || n.IsNull()) return out;
  if (n.IsScalar()) return {n.Scalar()};
  if (!n.IsSequence()) {
    m.error(key, "'" + m.path() + "." + std::string(key) + "' must be a name or a list of names");
    return out;
  }
  for (const auto& item : n) out.push_back(item.Scalar());
  return out;
}

void check_stream(const Case& c, MappingReader& m, std::string_view key, const std::string& name) {
  if (c.stream_index(name)) return;
  std::vector<std::string> names;
  for (const auto& s : c.streams) names.push_back(s.name);
  const std::string suggestion = closest_match(name, names);
  m.error(key, "'" + m.path() + "." + std::string(key) + "': unknown stream '" + name + "'" +
                   (suggestion.empty() ? "" : " (did you mean '" + suggestion + "'?)"));
}

void check_component(const Case& c, MappingReader& m, std::string_view key, const std::string& id) {
  if (c.components->index_of(id)) return;
  m.error(key, "'" + m.path() + "." + std::string(key) + "': component '" + id + "' is not among the case's components");
}

}  // namespace

Accounting read_accounting(const Case& c, DiagnosticList& diagnostics) {
  Accounting a;
  if (!c.document.IsMap()) return a;
  MappingReader m(c.document["accounting"], c.file, "accounting", diagnostics, c.currency);
  if (!m.is_valid()) return a;
  if (auto monomer = m.optional_mapping("monomer")) {
    a.monomer_stream = monomer->text("stream");
    check_stream(c, *monomer, "stream", *a.monomer_stream);
    a.monomer_component = monomer->text("component");
    check_component(c, *monomer, "component", a.monomer_component);
    monomer->finish();
  }
  a.polymer_feeds = read_id_list(m, "polymer_feeds");
  for (const auto& s : a.polymer_feeds) check_stream(c, m, "polymer_feeds", s);
  a.solvents = read_id_list(m, "solvents");
  for (const auto& s : a.solvents) check_component(c, m, "solvents", s);
  a.solvent_makeup_feeds = read_id_list(m, "solvent_makeup_feeds");
  for (const auto& s : a.solvent_makeup_feeds) check_stream(c, m, "solvent_makeup_feeds", s);
  a.water_feeds = read_id_list(m, "water_feeds");
  for (const auto& s : a.water_feeds) check_stream(c, m, "water_feeds", s);

  YAML::Node wastes = m.raw("wastes");
  if (wastes.IsDefined() && wastes.IsSequence()) {
    std::size_t index = 0;
    for (const auto& item : wastes) {
      MappingReader w(item, c.file, "accounting.wastes[" + std::to_string(index++) + "]", diagnostics, c.currency);
      if (!w.is_valid()) continue;
      WasteStream ws;
      ws.stream = w.text("stream");
      check_stream(c, w, "stream", ws.stream);
      const std::string cls = w.text("class");
      if (auto parsed = parse_waste_class(cls)) {
        ws.waste_class = *parsed;
      } else {
        const std::string suggestion = closest_match(cls, waste_class_names());
        w.error("class", "'" + w.path() + ".class': unknown waste class '" + cls + "'" +
                             (suggestion.empty() ? "" : " (did you mean '" + suggestion + "'?)"));
      }
      ws.hazardous = w.flag("hazardous", ws.waste_class == WasteClass::distillation_bottoms ||
                                             ws.waste_class == WasteClass::fore_cut);
      ws.description = w.text("description", "");
      w.finish();
      a.wastes.push_back(ws);
    }
  } else if (wastes.IsDefined() && !wastes.IsNull()) {
    m.error("wastes", "'accounting.wastes' must be a list");
  }

  YAML::Node byproducts = m.raw("byproducts");
  if (byproducts.IsDefined() && byproducts.IsSequence()) {
    std::size_t index = 0;
    for (const auto& item : byproducts) {
      MappingReader b(item, c.file, "accounting.byproducts[" + std::to_string(index++) + "]", diagnostics, c.currency);
      if (!b.is_valid()) continue;
      ByproductStream bp;
      bp.stream = b.text("stream");
      check_stream(c, b, "stream", bp.stream);
      const std::string credit = b.text("credit", "fuel");
      if (credit == "fuel") bp.credit = CreditKind::fuel;
      else if (credit == "chemical") bp.credit = CreditKind::chemical;
      else b.error("credit", "'" + b.path() + ".credit' must be fuel or chemical (found " + credit + ")");
      bp.component = b.text("component", "");
      if (bp.credit == CreditKind::chemical) {
        if (bp.component.empty()) b.error({}, "'" + b.path() + "': a chemical credit needs 'component'");
        else check_component(c, b, "component", bp.component);
      }
      b.finish();
      a.byproducts.push_back(bp);
    }
  } else if (byproducts.IsDefined() && !byproducts.IsNull()) {
    m.error("byproducts", "'accounting.byproducts' must be a list");
  }
  m.finish();
  return a;
}

}  // namespace unchain::costs
