// Loading a case file into a Case: components, feeds, blocks and the
// streams that connect them, solver settings. Schema: docs/case-format.md.
//
// Every check reports to one DiagnosticList so that a run names all the
// mistakes it can find; the InputError is thrown once, at the end.

#include <algorithm>
#include <cctype>
#include <cmath>
#include <map>
#include <set>
#include <sstream>

#include "flowsheet/case.hpp"
#include "flowsheet/flowsheet_graph.hpp"

namespace unchain {

std::optional<std::size_t> Case::stream_index(std::string_view name) const {
  for (std::size_t i = 0; i < streams.size(); ++i)
    if (streams[i].name == name) return i;
  return std::nullopt;
}

std::optional<std::size_t> Case::block_index(std::string_view name) const {
  for (std::size_t i = 0; i < blocks.size(); ++i)
    if (blocks[i].name == name) return i;
  return std::nullopt;
}

namespace {

// Top-level sections read by later layers (costing, reports); the loader
// accepts them unseen so that the unknown-key check does not refuse them.
const std::vector<std::string>& reserved_sections() {
  static const std::vector<std::string> names{"prices",      "capital",     "economics", "scale",
                                              "uncertainty", "sensitivity", "report",    "accounting"};
  return names;
}

std::string with_suggestion(const std::string& message, std::string_view word,
                            const std::vector<std::string>& candidates) {
  const std::string suggestion = closest_match(word, candidates);
  return suggestion.empty() ? message : message + " (did you mean '" + suggestion + "'?)";
}

std::string list_text(const std::vector<std::string>& items) {
  std::string out;
  for (const auto& i : items) out += (out.empty() ? "" : ", ") + i;
  return out.empty() ? std::string("none") : out;
}

bool is_currency_code(const std::string& text) {
  return text.size() == 3 &&
         std::all_of(text.begin(), text.end(), [](char ch) { return ch >= 'A' && ch <= 'Z'; });
}

std::string format_number(double value) {
  std::ostringstream out;
  out.precision(6);
  out << value;
  return out.str();
}

// A stream name as written in a block's inlets or outlets.
struct NamedStream {
  std::string name;
  SourceLocation where;
};

class CaseLoader {
 public:
  CaseLoader(const YamlDocument& document, const BlockCatalogue& catalogue, const ComponentLibrary& library)
      : document_(document), catalogue_(catalogue), library_(library) {}

  Case load();

 private:
  const YamlDocument& document_;
  const BlockCatalogue& catalogue_;
  const ComponentLibrary& library_;
  DiagnosticList diagnostics_;
  Case case_;
  std::set<std::string> listed_components_;     // as written, known or not
  std::set<std::string> names_of_broken_blocks_;  // streams of blocks that could not be created
  std::map<std::size_t, SourceLocation> estimate_where_;  // stream -> its solver.initial_estimates entry

  const std::string& file() const { return document_.file; }

  void read_case_section(MappingReader& root);
  void read_components(MappingReader& root);
  void read_feeds(MappingReader& root);
  void read_blocks(MappingReader& root);
  void read_block(const std::string& name, const YAML::Node& key, const YAML::Node& body);
  void connect(std::size_t block, const YAML::Node& node, const std::vector<PortSpec>& ports, bool inlet,
               const std::string& path);
  void check_streams();
  void read_solver(MappingReader& root);
  void check_plan();

  Stream read_contents(MappingReader& m);
  std::optional<double> read_amount(const YAML::Node& node, const std::string& path);
  std::size_t stream_named(const std::string& name, const SourceLocation& where);
  std::vector<NamedStream> stream_names_in(const YAML::Node& node, const std::string& path, bool report);
};

Case CaseLoader::load() {
  case_.file = file();
  MappingReader root(document_.root, file(), "", diagnostics_);
  if (!root.is_valid()) diagnostics_.throw_if_errors();
  for (const auto& key : reserved_sections()) root.accept(key);

  read_case_section(root);
  read_components(root);
  read_feeds(root);
  read_blocks(root);
  check_streams();
  read_solver(root);
  root.finish();
  if (!diagnostics_.has_errors()) check_plan();
  diagnostics_.throw_if_errors();

  for (const auto& d : diagnostics_.all())
    if (d.severity == Severity::warning) case_.warnings.push_back(d);
  case_.document = document_.root;
  return std::move(case_);
}

void CaseLoader::read_case_section(MappingReader& root) {
  MappingReader info = root.mapping("case");
  case_.title = info.text("title");
  case_.description = info.text("description", "");
  const std::string basis = info.text("basis");
  if (basis == "batch") {
    case_.basis = Basis::batch;
  } else if (basis == "continuous") {
    case_.basis = Basis::continuous;
  } else if (!basis.empty()) {
    info.error("basis", with_suggestion("'case.basis': unknown basis (expected batch or continuous, found '" +
                                            basis + "')",
                                        basis, {"batch", "continuous"}));
  }
  case_.currency = info.text("currency", "USD");
  if (!is_currency_code(case_.currency))
    info.error("currency", "'case.currency': expected a three-letter ISO 4217 code such as USD or EUR (found '" +
                               case_.currency + "')");
  case_.ambient_temperature = info.quantity<Temperature>("ambient_temperature", celsius(20.0));
  info.finish();
}

void CaseLoader::read_components(MappingReader& root) {
  std::vector<std::string> ids;
  std::vector<SourceLocation> where;
  const YAML::Node list = root.raw("components");
  if (!list.IsDefined() || list.IsNull()) {
    root.error({}, "missing required key 'components' (expected a list of component ids)");
  } else if (!list.IsSequence()) {
    diagnostics_.error(location_of(list, file()), "'components' must be a list of component ids such as "
                                                  "[polystyrene, acetone]");
  } else {
    for (const auto& item : list) {
      if (!item.IsScalar()) {
        diagnostics_.error(location_of(item, file()), "'components': expected a component id (found a " +
                                                          std::string(item.IsMap() ? "mapping" : "list") + ")");
        continue;
      }
      ids.push_back(item.Scalar());
      where.push_back(location_of(item, file()));
      listed_components_.insert(item.Scalar());
    }
    if (list.size() == 0) diagnostics_.error(location_of(list, file()), "'components' is empty (expected at least one id)");
  }

  // Components defined or overridden by the case go into a copy of the
  // library, so the shared built-in library is never changed.
  const ComponentLibrary* library = &library_;
  std::optional<ComponentLibrary> extended;
  const YAML::Node data = root.raw("component_data");
  if (data.IsDefined() && !data.IsNull()) {
    extended = library_;
    extended->load_components(data, file(), diagnostics_);
    library = &*extended;
  }
  case_.components = std::make_shared<const ComponentSet>(make_component_set(*library, ids, where, diagnostics_));
}

std::optional<double> CaseLoader::read_amount(const YAML::Node& node, const std::string& path) {
  auto parsed = detail::parse_node(node, file(), path, diagnostics_);
  if (!parsed) return std::nullopt;
  const bool batch = case_.basis == Basis::batch;
  double kg = 0.0;
  try {
    if (batch) {
      kg = to_si(convert_parsed<Mass>(*parsed));
    } else {
      // Stored per basis hour: kg/s times 3600.
      kg = to_si(convert_parsed<MassFlow>(*parsed)) * 3600.0;
    }
  } catch (const UnitError& e) {
    std::string hint;
    if (batch && parsed->dimension == dimension_of<MassFlow>())
      hint = "; a batch case takes amounts per batch such as \"1.5 kg\", or set case.basis: continuous";
    else if (!batch && parsed->dimension == dimension_of<Mass>())
      hint = "; a continuous case takes flows such as \"1.5 kg/h\", or set case.basis: batch";
    diagnostics_.error(location_of(node, file()), "'" + path + "': " + e.what() + hint);
    return std::nullopt;
  }
  if (!std::isfinite(kg) || kg < 0.0) {
    diagnostics_.error(location_of(node, file()), "'" + path + "': amount must not be negative (expected at least 0 " +
                                                      std::string(batch ? "kg" : "kg/h") + ", found \"" +
                                                      node.Scalar() + "\")");
    return std::nullopt;
  }
  return kg;
}

// Temperature, pressure, bulk density and per-phase amounts: the shape of a
// feed and of an initial estimate.
Stream CaseLoader::read_contents(MappingReader& m) {
  Stream s(*case_.components);
  s.set_temperature(m.quantity<Temperature>("temperature", case_.ambient_temperature));
  const Pressure P = m.quantity<Pressure>("pressure", pascal(standard_atmosphere_Pa));
  if (!(to_si(P) > 0.0))
    m.error("pressure", "'" + m.path() + ".pressure': expected a positive absolute pressure (found " +
                            format_number(to_si(P)) + " Pa)");
  else
    s.set_pressure(P);
  if (auto density = m.optional_quantity<Density>("bulk_density")) {
    if (!(to_si(*density) > 0.0))
      m.error("bulk_density", "'" + m.path() + ".bulk_density': expected a positive density (found " +
                                  format_number(to_si(*density)) + " kg/m3)");
    else
      s.set_bulk_density(*density);
  }
  std::vector<std::string> ids;
  for (const auto& c : case_.components->components()) ids.push_back(c.id);
  for (Phase phase : all_phases) {
    auto amounts = m.optional_mapping(phase_name(phase));
    if (!amounts) continue;
    for (const auto& item : amounts->node()) {
      const std::string id = item.first.Scalar();
      amounts->accept(id);
      const std::string path = amounts->path() + "." + id;
      const auto index = case_.components->index_of(id);
      if (!index) {
        // An id already refused in the components list is not reported again.
        if (listed_components_.count(id) == 0)
          diagnostics_.error(location_of(item.first, file()),
                             with_suggestion("'" + path + "': component '" + id +
                                                 "' is not in the case's components list",
                                             id, ids));
        continue;
      }
      const auto kg = read_amount(item.second, path);
      if (!kg) continue;
      const Component& component = (*case_.components)[*index];
      if (phase == Phase::vapour && component.is_condensed_only()) {
        diagnostics_.error(location_of(item.first, file()), "'" + path + "': component '" + id + "' is a " +
                                                                kind_name(component.kind) +
                                                                " and cannot be in the vapour phase (expected "
                                                                "solid or liquid)");
        continue;
      }
      s.set_mass(phase, *index, kilograms(*kg));
    }
    amounts->finish();
  }
  return s;
}

std::size_t CaseLoader::stream_named(const std::string& name, const SourceLocation& where) {
  if (auto i = case_.stream_index(name)) return *i;
  StreamInfo info;
  info.name = name;
  info.where = where;
  info.initial = Stream(*case_.components);
  info.initial.set_temperature(case_.ambient_temperature);
  case_.streams.push_back(std::move(info));
  return case_.streams.size() - 1;
}

void CaseLoader::read_feeds(MappingReader& root) {
  const YAML::Node feeds = root.raw("feeds");
  if (!feeds.IsDefined() || feeds.IsNull()) return;
  if (!feeds.IsMap()) {
    diagnostics_.error(location_of(feeds, file()), "'feeds' must be a mapping of stream names to their contents");
    return;
  }
  for (const auto& item : feeds) {
    const std::string name = item.first.Scalar();
    MappingReader m(item.second, file(), "feeds." + name, diagnostics_);
    if (!m.is_valid()) continue;
    const std::size_t index = stream_named(name, location_of(item.first, file()));
    StreamInfo& info = case_.streams[index];
    info.is_feed = true;
    info.initial = read_contents(m);
    m.finish();
  }
}

void CaseLoader::read_blocks(MappingReader& root) {
  const YAML::Node blocks = root.raw("blocks");
  if (!blocks.IsDefined() || blocks.IsNull()) {
    root.error({}, "missing required section 'blocks' (expected a mapping of block names to blocks)");
    return;
  }
  if (!blocks.IsMap()) {
    diagnostics_.error(location_of(blocks, file()), "'blocks' must be a mapping of block names to blocks");
    return;
  }
  if (blocks.size() == 0) diagnostics_.error(location_of(blocks, file()), "'blocks' is empty (expected at least one block)");
  for (const auto& item : blocks) read_block(item.first.Scalar(), item.first, item.second);
}

// The stream names under a block's inlets or outlets, whatever the shape;
// used to keep the streams of a broken block from raising further errors.
std::vector<NamedStream> CaseLoader::stream_names_in(const YAML::Node& node, const std::string& path, bool report) {
  std::vector<NamedStream> out;
  auto take = [&](const YAML::Node& n) {
    if (n.IsScalar()) {
      out.push_back({n.Scalar(), location_of(n, file())});
    } else if (report) {
      diagnostics_.error(location_of(n, file()), "'" + path + "': expected a stream name");
    }
  };
  if (node.IsScalar()) {
    take(node);
  } else if (node.IsSequence()) {
    for (const auto& n : node) take(n);
  } else if (node.IsMap()) {
    for (const auto& kv : node) {
      if (kv.second.IsSequence()) {
        for (const auto& n : kv.second) take(n);
      } else {
        take(kv.second);
      }
    }
  }
  return out;
}

void CaseLoader::read_block(const std::string& name, const YAML::Node& key, const YAML::Node& body) {
  const std::string path = "blocks." + name;
  MappingReader reader(body, file(), path, diagnostics_, case_.currency);
  if (!reader.is_valid()) return;
  BlockInstance block;
  block.name = name;
  block.where = location_of(key, file());
  block.type = reader.text("type");
  const YAML::Node inlets = reader.raw("inlets");
  const YAML::Node outlets = reader.raw("outlets");

  auto remember_broken = [&] {
    for (const auto& s : stream_names_in(inlets, path + ".inlets", false)) names_of_broken_blocks_.insert(s.name);
    for (const auto& s : stream_names_in(outlets, path + ".outlets", false)) names_of_broken_blocks_.insert(s.name);
  };
  if (block.type.empty()) {
    remember_broken();
    return;
  }
  const BlockSetup setup{*case_.components, case_.basis, name, case_.currency};
  try {
    block.model = catalogue_.create(block.type, reader, setup);
  } catch (const InputError& e) {
    for (const auto& d : e.diagnostics()) diagnostics_.error(d.where, d.message);
  } catch (const ModelError& e) {
    diagnostics_.error(block.where, "block '" + name + "' (" + block.type + "): " + e.what());
  }
  if (!block.model) {
    const auto types = catalogue_.type_names();
    if (std::find(types.begin(), types.end(), block.type) == types.end()) {
      const std::string suggestion = closest_match(block.type, types);
      reader.error("type", "'" + path + ".type': unknown block type '" + block.type + "' (" +
                               (suggestion.empty() ? "expected one of: " + list_text(types)
                                                   : "did you mean '" + suggestion + "'?") +
                               ")");
    }
    remember_broken();
    return;
  }
  const std::size_t index = case_.blocks.size();
  case_.blocks.push_back(std::move(block));
  const auto inlet_ports = case_.blocks[index].model->inlet_ports();
  const auto outlet_ports = case_.blocks[index].model->outlet_ports();
  connect(index, inlets, inlet_ports, true, path + ".inlets");
  connect(index, outlets, outlet_ports, false, path + ".outlets");
}

void CaseLoader::connect(std::size_t block_index, const YAML::Node& node, const std::vector<PortSpec>& ports,
                         bool inlet, const std::string& path) {
  const char* kind = inlet ? "inlet" : "outlet";
  std::vector<std::string> roles;
  for (const auto& p : ports) roles.push_back(p.role);
  // Read as role -> stream names.
  std::vector<std::pair<std::string, std::vector<NamedStream>>> wanted;
  const SourceLocation at = location_of(node, file());
  if (node.IsDefined() && !node.IsNull()) {
    if (node.IsMap()) {
      for (const auto& kv : node) {
        const std::string role = kv.first.Scalar();
        std::vector<NamedStream> names;
        if (kv.second.IsMap())
          diagnostics_.error(location_of(kv.second, file()), "'" + path + "." + role +
                                                                 "': expected a stream name or a list of stream names "
                                                                 "(found a mapping)");
        else
          names = stream_names_in(kv.second, path + "." + role, true);
        if (std::find(roles.begin(), roles.end(), role) == roles.end()) {
          for (const auto& s : names) names_of_broken_blocks_.insert(s.name);
          diagnostics_.error(location_of(kv.first, file()),
                             "'" + path + "': unknown " + kind + " role '" + role + "' of block type '" +
                                 case_.blocks[block_index].type + "' (" +
                                 (closest_match(role, roles).empty()
                                      ? "expected one of: " + list_text(roles)
                                      : "did you mean '" + closest_match(role, roles) + "'?") +
                                 ")");
          continue;
        }
        wanted.emplace_back(role, names);
      }
    } else if (ports.size() == 1) {
      wanted.emplace_back(ports.front().role, stream_names_in(node, path, true));  // a list or one name
    } else {
      for (const auto& s : stream_names_in(node, path, false)) names_of_broken_blocks_.insert(s.name);
      diagnostics_.error(at, "'" + path + "': a plain list of streams is allowed only when the block has one " +
                                 kind + " role (expected a mapping of role to stream; roles: " + list_text(roles) + ")");
    }
  }

  BlockInstance& block = case_.blocks[block_index];
  for (auto& [role, names] : wanted) {
    // A named copy: clang before 16 cannot capture a structured binding.
    const std::string& wanted_role = role;
    const PortSpec& port =
        *std::find_if(ports.begin(), ports.end(), [&](const PortSpec& p) { return p.role == wanted_role; });
    if (names.size() > 1 && !port.many)
      diagnostics_.error(names[1].where, "'" + path + "." + role + "': " + kind + " '" + role +
                                             "' takes one stream (found " + std::to_string(names.size()) + ")");
    for (const auto& named : names) {
      const std::size_t s = stream_named(named.name, named.where);
      StreamInfo& info = case_.streams[s];
      if (inlet) {
        if (info.destination) {
          diagnostics_.error(named.where, "stream '" + named.name + "' is consumed twice: by block '" +
                                              case_.blocks[*info.destination].name + "' (inlet '" +
                                              info.destination_role + "') and by block '" + block.name +
                                              "' (inlet '" + role +
                                              "') (expected one destination; add a splitter to divide a stream)");
          continue;
        }
        info.destination = block_index;
        info.destination_role = role;
        block.inlets[role].push_back(s);
      } else {
        if (info.is_feed || info.source) {
          const std::string first = info.is_feed ? "a feed (" + info.where.to_string() + ")"
                                                 : "block '" + case_.blocks[*info.source].name + "' (outlet '" +
                                                       info.source_role + "')";
          diagnostics_.error(named.where, "stream '" + named.name + "' has two sources: " + first + " and block '" +
                                              block.name + "' (outlet '" + role +
                                              "') (expected one source; add a mixer to join streams)");
          continue;
        }
        info.source = block_index;
        info.source_role = role;
        block.outlets[role].push_back(s);
      }
    }
  }
  for (const auto& port : ports) {
    if (!port.required) continue;
    const auto& connected = inlet ? block.inlets : block.outlets;
    auto it = connected.find(port.role);
    const bool named = std::any_of(wanted.begin(), wanted.end(), [&](const auto& w) { return w.first == port.role; });
    if ((it == connected.end() || it->second.empty()) && !named)
      diagnostics_.error(block.where, "block '" + block.name + "' (" + block.type + ") is missing its required " +
                                          kind + " '" + port.role + "'" +
                                          (port.description.empty() ? std::string() : " (" + port.description + ")") +
                                          " (expected " + path + "." + port.role + ": STREAM)");
  }
}

void CaseLoader::check_streams() {
  std::vector<std::string> defined;
  for (const auto& s : case_.streams)
    if (s.is_feed || s.source) defined.push_back(s.name);
  for (const auto& s : case_.streams) {
    if (s.is_feed || s.source || !s.destination) continue;
    if (names_of_broken_blocks_.count(s.name) != 0) continue;
    diagnostics_.error(s.where, with_suggestion("undefined stream '" + s.name + "': inlet '" + s.destination_role +
                                                    "' of block '" + case_.blocks[*s.destination].name +
                                                    "' is neither a feed nor an outlet of any block",
                                                s.name, defined));
  }
  for (const auto& s : case_.streams) {
    if (!s.is_feed || s.destination || names_of_broken_blocks_.count(s.name) != 0) continue;
    diagnostics_.warning(s.where, "feed '" + s.name + "' is not an inlet of any block; it passes straight to the products");
  }
}

void CaseLoader::read_solver(MappingReader& root) {
  auto m = root.optional_mapping("solver");
  if (!m) return;
  SolverSettings& settings = case_.solver;
  const std::string method = m->text("method", "wegstein");
  if (method == "wegstein") {
    settings.method = ConvergenceMethod::wegstein;
  } else if (method == "direct_substitution") {
    settings.method = ConvergenceMethod::direct_substitution;
  } else {
    m->error("method", with_suggestion("'solver.method': unknown method (expected wegstein or direct_substitution, "
                                       "found '" + method + "')",
                                       method, {"wegstein", "direct_substitution"}));
  }
  if (auto tolerance = m->optional_number("tolerance")) {
    if (*tolerance > 0.0 && *tolerance < 1.0)
      settings.tolerance = *tolerance;
    else
      m->error("tolerance", "'solver.tolerance' out of range (expected a number between 0 and 1, found " +
                                format_number(*tolerance) + ")");
  }
  if (auto iterations = m->optional_number("max_iterations")) {
    if (*iterations >= 1.0 && *iterations <= 1e6 && std::floor(*iterations) == *iterations)
      settings.max_iterations = static_cast<int>(*iterations);
    else
      m->error("max_iterations", "'solver.max_iterations' out of range (expected a whole number from 1 to 1000000, "
                                 "found " + format_number(*iterations) + ")");
  }
  settings.wegstein_q_min = m->number_in("wegstein_q_min", settings.wegstein_q_min, -100.0, 0.99);
  settings.wegstein_q_max = m->number_in("wegstein_q_max", settings.wegstein_q_max, -100.0, 0.99);
  if (settings.wegstein_q_min > settings.wegstein_q_max)
    m->error("wegstein_q_min", "'solver.wegstein_q_min' must not exceed wegstein_q_max (found " +
                                   format_number(settings.wegstein_q_min) + " > " +
                                   format_number(settings.wegstein_q_max) + ")");

  const YAML::Node tears = m->raw("tear_streams");
  if (tears.IsDefined() && !tears.IsNull()) {
    if (!tears.IsSequence()) {
      diagnostics_.error(location_of(tears, file()), "'solver.tear_streams' must be a list of stream names");
    } else {
      for (const auto& t : tears) {
        if (!t.IsScalar()) {
          diagnostics_.error(location_of(t, file()), "'solver.tear_streams': expected a stream name");
          continue;
        }
        settings.tear_streams.push_back(t.Scalar());
        settings.tear_stream_locations.push_back(location_of(t, file()));
      }
    }
  }

  if (auto estimates = m->optional_mapping("initial_estimates")) {
    std::vector<std::string> names;
    for (const auto& s : case_.streams)
      if (s.source && s.destination) names.push_back(s.name);
    for (const auto& item : estimates->node()) {
      const std::string name = item.first.Scalar();
      estimates->accept(name);
      MappingReader contents(item.second, file(), estimates->path() + "." + name, diagnostics_);
      if (!contents.is_valid()) continue;
      const auto index = case_.stream_index(name);
      if (!index || case_.streams[*index].is_feed || !case_.streams[*index].source ||
          !case_.streams[*index].destination) {
        diagnostics_.error(location_of(item.first, file()),
                           with_suggestion("'" + contents.path() + "': '" + name +
                                               "' is not a stream between two blocks (an initial estimate is for "
                                               "a tear stream of a recycle loop)",
                                           name, names));
        continue;
      }
      StreamInfo& info = case_.streams[*index];
      info.initial = read_contents(contents);
      info.has_initial_estimate = true;
      estimate_where_[*index] = location_of(item.first, file());
      contents.finish();
    }
  }
  m->finish();
}

// Validates the user's tear streams and notes initial estimates the
// calculation will not use.
void CaseLoader::check_plan() {
  try {
    const auto steps = plan_calculation(case_);
    std::set<std::size_t> tears;
    for (const auto& step : steps) tears.insert(step.tear_streams.begin(), step.tear_streams.end());
    for (std::size_t s = 0; s < case_.streams.size(); ++s) {
      const StreamInfo& info = case_.streams[s];
      if (!info.has_initial_estimate || tears.count(s) != 0) continue;
      const auto at = estimate_where_.find(s);
      diagnostics_.warning(at != estimate_where_.end() ? at->second : info.where, "initial estimate of stream '" + info.name +
                                           "' is not used: it is not a tear stream (name it in solver.tear_streams "
                                           "to tear it)");
    }
  } catch (const InputError& e) {
    for (const auto& d : e.diagnostics()) diagnostics_.error(d.where, d.message);
  }
}

// ---- overrides ---------------------------------------------------------------

// Overrides come from the command line, not from the file.
SourceLocation command_line() { return {"command line", 0, 0}; }

std::optional<std::size_t> list_index(const std::string& text) {
  if (text.empty() || text.size() > 9 ||
      !std::all_of(text.begin(), text.end(), [](char ch) { return std::isdigit(static_cast<unsigned char>(ch)); }))
    return std::nullopt;
  return static_cast<std::size_t>(std::stoul(text));
}

std::vector<std::string> keys_of(const YAML::Node& map) {
  std::vector<std::string> keys;
  for (const auto& kv : map)
    if (kv.first.IsScalar()) keys.push_back(kv.first.Scalar());
  return keys;
}

// A copy of a node without marks, so that errors in an overridden value do
// not point at some unrelated line of the file.
YAML::Node without_marks(const YAML::Node& node) {
  if (node.IsScalar()) return YAML::Node(node.Scalar());
  if (node.IsSequence()) {
    YAML::Node out(YAML::NodeType::Sequence);
    for (const auto& item : node) out.push_back(without_marks(item));
    return out;
  }
  if (node.IsMap()) {
    YAML::Node out(YAML::NodeType::Map);
    for (const auto& kv : node) out[without_marks(kv.first)] = without_marks(kv.second);
    return out;
  }
  return YAML::Node(YAML::NodeType::Null);
}

// The value as a YAML node: a flow list or mapping when written as one
// ("[a, b]", "{x: 1}"), otherwise the text itself (so "Run: 2" stays text).
YAML::Node override_value(const Override& o) {
  const std::string& v = o.value;
  const auto first = v.find_first_not_of(' ');
  if (first != std::string::npos && (v[first] == '[' || v[first] == '{')) {
    // The checks of a case file apply (UTF-8, nesting, duplicate keys, alias
    // cycles and alias bombs): without_marks would recurse forever on a
    // value such as "&a [*a]".
    try {
      return without_marks(parse_yaml_text(v, "--set '" + o.path + "'").root);
    } catch (const InputError& e) {
      const std::string why = e.diagnostics().empty() ? std::string(e.what()) : e.diagnostics().front().message;
      throw InputError(command_line(), "--set '" + o.path + "': the value is not a valid YAML list or mapping (" +
                                         why + ")");
    }
  }
  return YAML::Node(v);
}

void apply_override(YAML::Node& root, const Override& o) {
  const auto parts = split_override_path(o.path);
  for (const auto& p : parts)
    if (p.empty()) throw InputError(command_line(), "--set '" + o.path + "': empty part in the path (expected KEY.KEY...)");
  YAML::Node current;
  current.reset(root);  // reset rebinds; assignment would overwrite the tree
  std::string walked;
  for (std::size_t i = 0; i + 1 < parts.size(); ++i) {
    const std::string& key = parts[i];
    const std::string here = walked.empty() ? std::string("the document") : "'" + walked + "'";
    YAML::Node next;
    if (current.IsMap()) {
      const auto keys = keys_of(current);
      if (std::find(keys.begin(), keys.end(), key) == keys.end())
        throw InputError(command_line(), with_suggestion("--set '" + o.path + "': no key '" + key + "' in " + here +
                                                           " (existing keys: " + list_text(keys) + ")",
                                                       key, keys));
      next.reset(current[key]);
    } else if (current.IsSequence()) {
      const auto index = list_index(key);
      if (!index || *index >= current.size())
        throw InputError(command_line(), "--set '" + o.path + "': " + here + " is a list of " +
                                           std::to_string(current.size()) + " items (expected an index from 0 to " +
                                           std::to_string(current.size() == 0 ? 0 : current.size() - 1) +
                                           ", found '" + key + "')");
      next.reset(current[*index]);
    } else {
      throw InputError(command_line(), "--set '" + o.path + "': " + here + " is a single value, not a mapping or list "
                                     "(expected a path to an existing section)");
    }
    walked += (walked.empty() ? "" : ".") + key;
    current.reset(next);
  }
  const std::string& last = parts.back();
  const YAML::Node value = override_value(o);
  if (current.IsSequence()) {
    const auto index = list_index(last);
    if (!index || *index > current.size())
      throw InputError(command_line(), "--set '" + o.path + "': '" + walked + "' is a list of " +
                                         std::to_string(current.size()) + " items (expected an index from 0 to " +
                                         std::to_string(current.size()) + ", found '" + last + "')");
    if (*index == current.size()) current.push_back(value);
    else current[*index] = value;
    return;
  }
  if (!current.IsMap() && !(current.IsNull() && !walked.empty())) {
    throw InputError(command_line(), "--set '" + o.path + "': '" + walked + "' is a single value, not a mapping "
                                   "(expected a path to an existing section)");
  }
  // A new key is allowed here; the unknown-key check of the loader catches
  // a misspelt one with a suggestion.
  current[last] = value;
}

}  // namespace

Override parse_override(std::string_view text) {
  const auto equals = text.find('=');
  if (equals == std::string_view::npos || equals == 0)
    throw InputError(command_line(), "--set expects PATH=VALUE such as blocks.dryer.temperature=\"80 degC\" (found \"" +
                                       std::string(text) + "\")");
  std::string path(text.substr(0, equals));
  while (!path.empty() && path.back() == ' ') path.pop_back();
  while (!path.empty() && path.front() == ' ') path.erase(path.begin());
  std::string value(text.substr(equals + 1));
  while (!value.empty() && value.front() == ' ') value.erase(value.begin());
  while (!value.empty() && value.back() == ' ') value.pop_back();
  if (path.empty())
    throw InputError(command_line(), "--set expects PATH=VALUE (found an empty path in \"" + std::string(text) + "\")");
  return {path, value};
}

void apply_overrides(YAML::Node& root, const std::vector<Override>& overrides) {
  DiagnosticList diagnostics;
  for (const auto& o : overrides) {
    try {
      apply_override(root, o);
    } catch (const InputError& e) {
      for (const auto& d : e.diagnostics()) diagnostics.error(d.where, d.message);
    }
  }
  diagnostics.throw_if_errors();
}

Case load_case(const YamlDocument& document, const BlockCatalogue& catalogue, const ComponentLibrary& library) {
  return CaseLoader(document, catalogue, library).load();
}

Case load_case_file(const std::string& path, const BlockCatalogue& catalogue, const std::vector<Override>& overrides) {
  YamlDocument document = load_yaml_file(path);
  apply_overrides(document.root, overrides);
  return load_case(document, catalogue);
}

std::vector<std::string> split_override_path(std::string_view path) {
  std::vector<std::string> parts(1);
  for (char ch : path) {
    if (ch == '.') parts.emplace_back();
    else parts.back() += ch;
  }
  return parts;
}

}  // namespace unchain
