#include "costs/scale_ladder.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <filesystem>

#include "costs/capital.hpp"
#include "costs/price_book.hpp"
#include "flowsheet/yaml_reader.hpp"

namespace unchain::costs {

namespace {

const char* const feed_phases[] = {"solid", "liquid", "vapour"};

std::vector<std::string> map_keys(const YAML::Node& map) {
  std::vector<std::string> keys;
  if (!map.IsMap()) return keys;
  for (const auto& kv : map)
    if (kv.first.IsScalar()) keys.push_back(kv.first.Scalar());
  return keys;
}

// The scalar at a dotted path, or a message saying where the path stops.
struct PathLookup {
  YAML::Node node;
  std::string problem;  // empty when found
};

PathLookup look_up(const YAML::Node& root, const std::string& path) {
  YAML::Node current;
  current.reset(root);
  std::string walked;
  for (const std::string& key : split_override_path(path)) {
    const std::string here = walked.empty() ? std::string("the case") : "'" + walked + "'";
    if (key.empty()) return {{}, "empty part in the path (expected KEY.KEY...)"};
    YAML::Node next;
    if (current.IsMap()) {
      const auto keys = map_keys(current);
      if (std::find(keys.begin(), keys.end(), key) == keys.end()) {
        const std::string suggestion = closest_match(key, keys);
        return {{}, "no key '" + key + "' in " + here +
                        (suggestion.empty() ? std::string() : " (did you mean '" + suggestion + "'?)")};
      }
      next.reset(current[key]);
    } else if (current.IsSequence()) {
      char* end = nullptr;
      const unsigned long index = std::strtoul(key.c_str(), &end, 10);
      if (end == key.c_str() || *end != '\0' || index >= current.size())
        return {{}, fmt::format("{} is a list of {} items (found index '{}')", here, current.size(), key)};
      next.reset(current[index]);
    } else {
      return {{}, here + " is a single value, not a mapping (the path goes on with '" + key + "')"};
    }
    walked += (walked.empty() ? "" : ".") + key;
    current.reset(next);
  }
  if (!current.IsScalar()) return {{}, "'" + path + "' is not a single value (expected a number or a quantity)"};
  return {current, {}};
}

std::string trimmed(const std::string& text) {
  const auto first = text.find_first_not_of(" \t");
  if (first == std::string::npos) return {};
  const auto last = text.find_last_not_of(" \t");
  return text.substr(first, last - first + 1);
}

// Shortest text that reads back as the same double.
std::string number_text(double value) { return fmt::format("{}", value); }

// Overrides for every amount of a feed-shaped mapping (a feed or an initial estimate).
void scale_amounts(const YAML::Node& stream, const std::string& prefix, const std::string& case_file,
                   double factor, std::vector<Override>& out) {
  if (!stream.IsMap()) return;
  for (const char* phase : feed_phases) {
    const YAML::Node amounts = stream[phase];
    if (!amounts || !amounts.IsMap()) continue;
    for (const auto& kv : amounts) {
      if (!kv.first.IsScalar() || !kv.second.IsScalar()) continue;
      const std::string path = prefix + "." + phase + "." + kv.first.Scalar();
      out.push_back({path, scaled_quantity_text(kv.second.Scalar(), factor, location_of(kv.second, case_file), path)});
    }
  }
}

double read_exponent(MappingReader& entry, const std::string& path) {
  if (auto n = entry.optional_number_in("exponent", -3.0, 3.0)) return *n;
  if (entry.has("exponent")) return 1.0;  // reported already
  if (auto d = default_scale_exponent(path)) return *d;
  entry.error({}, "'" + entry.path() + "' needs an 'exponent' (no default for '" + path +
                      "'; volume and power default to 1, area and vessel_mass to 0.667)");
  return 1.0;
}

std::vector<double> read_factors(MappingReader& m) {
  std::vector<double> factors;
  const YAML::Node node = m.raw("factors");
  if (!node) return ScaleSettings{}.factors;
  if (!node.IsSequence() || node.size() == 0) {
    m.error("factors", "'scale.factors' must be a list of positive numbers such as [1, 10, 100]");
    return ScaleSettings{}.factors;
  }
  for (std::size_t i = 0; i < node.size(); ++i) {
    const YAML::Node item = node[i];
    double value = std::nan("");
    if (item.IsScalar()) {
      const std::string text = trimmed(item.Scalar());
      char* end = nullptr;
      errno = 0;
      value = std::strtod(text.c_str(), &end);
      if (text.empty() || *end != '\0' || errno != 0) value = std::nan("");
    }
    if (!std::isfinite(value) || value <= 0.0) {
      m.diagnostics().error(location_of(item, m.file()),
                            fmt::format("'scale.factors[{}]' must be a positive number (found '{}')", i,
                                        item.IsScalar() ? item.Scalar() : std::string("a list or mapping")));
      continue;
    }
    factors.push_back(value);
  }
  std::sort(factors.begin(), factors.end());
  factors.erase(std::unique(factors.begin(), factors.end()), factors.end());
  return factors;
}

std::vector<std::string> read_feed_list(MappingReader& m, const YAML::Node& document) {
  std::vector<std::string> names;
  const YAML::Node node = m.raw("feeds");
  if (!node) return names;
  const auto feed_names = map_keys(document["feeds"]);
  if (!node.IsSequence()) {
    m.error("feeds", "'scale.feeds' must be a list of feed names such as [foam]");
    return names;
  }
  for (std::size_t i = 0; i < node.size(); ++i) {
    const YAML::Node item = node[i];
    const std::string name = item.IsScalar() ? item.Scalar() : std::string();
    if (std::find(feed_names.begin(), feed_names.end(), name) == feed_names.end()) {
      const std::string suggestion = closest_match(name, feed_names);
      m.diagnostics().error(location_of(item, m.file()),
                            fmt::format("'scale.feeds[{}]': '{}' is not a feed of the case{}", i, name,
                                        suggestion.empty() ? std::string() : " (did you mean '" + suggestion + "'?)"));
      continue;
    }
    names.push_back(name);
  }
  return names;
}

std::vector<ScaledParameter> read_scaled_parameters(MappingReader& m, const YAML::Node& document) {
  std::vector<ScaledParameter> out;
  const YAML::Node node = m.raw("scaled_parameters");
  if (!node) return out;
  if (!node.IsSequence()) {
    m.error("scaled_parameters",
            "'scale.scaled_parameters' must be a list such as [{path: blocks.reactor.reactor_volume, exponent: 1}]");
    return out;
  }
  for (std::size_t i = 0; i < node.size(); ++i) {
    MappingReader entry(node[i], m.file(), fmt::format("scale.scaled_parameters[{}]", i), m.diagnostics());
    if (!entry.is_valid()) continue;
    ScaledParameter p;
    p.path = trimmed(entry.text("path", ""));
    p.where = entry.has("path") ? entry.location_of_key("path") : entry.location();
    if (p.path.empty()) {
      entry.error({}, "missing required key '" + entry.path() + ".path' (expected a dotted path such as "
                                                               "blocks.reactor.reactor_volume)");
      entry.accept("exponent");
      entry.finish();
      continue;
    }
    p.exponent = read_exponent(entry, p.path);
    entry.finish();
    const PathLookup found = look_up(document, p.path);
    if (!found.problem.empty()) {
      m.diagnostics().error(p.where, "'" + entry.path() + ".path': " + found.problem);
      continue;
    }
    try {
      (void)scaled_quantity_text(found.node.Scalar(), 1.0, location_of(found.node, m.file()), p.path);
    } catch (const InputError&) {
      // The mistake is the entry, not the value it points at.
      m.diagnostics().error(p.where, "'" + entry.path() + ".path': the value at '" + p.path +
                                         "' cannot be scaled (expected a number or a quantity such as \"1 L\", "
                                         "found '" + found.node.Scalar() + "')");
      continue;
    }
    out.push_back(p);
  }
  return out;
}

bool is_listed(const ScaleSettings& s, const std::string& path) {
  return std::any_of(s.scaled_parameters.begin(), s.scaled_parameters.end(),
                     [&](const ScaledParameter& p) { return p.path == path; });
}

// Vessel sizes a user probably meant to scale but did not list.
std::vector<std::string> unscaled_size_notes(const YAML::Node& document, const ScaleSettings& s) {
  std::vector<std::string> notes;
  const YAML::Node blocks = document["blocks"];
  if (!blocks || !blocks.IsMap()) return notes;
  for (const auto& kv : blocks) {
    if (!kv.first.IsScalar() || !kv.second.IsMap()) continue;
    const std::string block = kv.first.Scalar();
    for (const char* key : {"reactor_volume", "vessel_volume"}) {
      const std::string path = "blocks." + block + "." + key;
      if (kv.second[key] && !is_listed(s, path))
        notes.push_back(path + " is not in scale.scaled_parameters: the vessel keeps its factor-1 size at every "
                               "factor (a larger charge may need more runs or not fit)");
    }
    const std::string area = "blocks." + block + ".outer_area";
    if (kv.second["outer_area"] && !is_listed(s, area))
      notes.push_back(area + " is given directly and not scaled: its heat loss stays at the factor-1 area "
                             "(list it with exponent 0.667 to follow V^(2/3))");
  }
  return notes;
}

double labour_base_hours_s(const YAML::Node& document, const std::string& case_file, const LabourRule& rule) {
  if (rule.hours_per_batch_s) return *rule.hours_per_batch_s;
  if (!document["prices"] || !document["prices"].IsMap()) return 0.0;
  std::string currency = "USD";
  if (document["case"] && document["case"]["currency"] && document["case"]["currency"].IsScalar())
    currency = document["case"]["currency"].Scalar();
  DiagnosticList ignored;  // price errors are reported by the evaluation itself
  const PriceBook book = read_price_book(document, case_file, currency, ignored);
  return to_si(book.labour_hours_per_batch);
}


// Units per year: batches per year, or operating hours per year.
double periods_per_year(const Evaluation& e) {
  DiagnosticList ignored;
  const CapitalSettings capital = read_capital_settings(*e.loaded, ignored);
  return e.loaded->basis == Basis::batch ? capital.batches_per_year : capital.operating_hours_per_year;
}

void fill_rung(ScaleRung& rung, StudyOutcome&& outcome, double labour_hours_s) {
  rung.status = outcome.status;
  rung.error = std::move(outcome.error);
  if (!outcome.evaluation) return;
  const Evaluation& e = *outcome.evaluation;
  rung.figures = e.figures;
  for (const auto& b : e.loaded->blocks) rung.block_types.push_back(b.type);
  if (labour_hours_s > 0.0) rung.labour_hours_per_basis = labour_hours_s / 3600.0;
  if (e.report.monomer_kg) rung.annual_monomer_kg = *e.report.monomer_kg * periods_per_year(e);
}

double labour_hours_at(double base_s, const LabourRule& rule, double factor) {
  return base_s * std::pow(factor, rule.exponent);
}

}  // namespace

std::string describe_input_error(const InputError& e) {
  if (e.diagnostics().empty()) return e.what();
  std::string text;
  for (const auto& d : e.diagnostics()) {
    if (d.severity != Severity::error) continue;
    text += (text.empty() ? "" : "\n") + d.to_string();
  }
  return text.empty() ? std::string(e.what()) : text;
}

StudyOutcome evaluate_study_point(const PreparedCase& prepared, const std::vector<Override>& overrides) {
  StudyOutcome r;
  try {
    r.evaluation = prepared.evaluate_full(overrides);
  } catch (const InputError& e) {
    r.status = StudyPointStatus::bad_input;
    r.error = describe_input_error(e);
  } catch (const ConvergenceError& e) {
    r.status = StudyPointStatus::not_converged;
    r.error = e.what();
  } catch (const ModelError& e) {
    r.status = StudyPointStatus::bad_input;
    r.error = e.what();
  } catch (const UnitError& e) {
    r.status = StudyPointStatus::bad_input;
    r.error = e.what();
  }
  return r;
}

const char* study_point_status_name(StudyPointStatus status) {
  switch (status) {
    case StudyPointStatus::solved: return "solved";
    case StudyPointStatus::bad_input: return "bad_input";
    case StudyPointStatus::not_converged: return "not_converged";
  }
  return "unknown";
}

std::optional<double> default_scale_exponent(std::string_view path) {
  const auto dot = path.rfind('.');
  const std::string_view key = dot == std::string_view::npos ? path : path.substr(dot + 1);
  auto ends_with = [&](std::string_view tail) {
    return key.size() >= tail.size() && key.substr(key.size() - tail.size()) == tail;
  };
  if (ends_with("volume") || ends_with("power")) return 1.0;
  if (ends_with("area") || key == "vessel_mass") return 2.0 / 3.0;
  return std::nullopt;
}

std::string scaled_quantity_text(const std::string& text, double multiplier, const SourceLocation& where,
                                 const std::string& key_path) {
  const std::string t = trimmed(text);
  char* end = nullptr;
  errno = 0;
  const double number = std::strtod(t.c_str(), &end);
  if (t.empty() || end == t.c_str() || errno != 0 || !std::isfinite(number))
    throw InputError(where, "'" + key_path + "' cannot be scaled (expected a number or a quantity such as \"1 kg\", "
                                             "found '" + text + "')");
  const std::string unit = trimmed(std::string(end));
  const std::string value = number_text(number * multiplier);
  return unit.empty() ? value : value + " " + unit;
}

ScaleSettings read_scale_settings(const YAML::Node& document, const std::string& case_file,
                                  DiagnosticList& diagnostics) {
  ScaleSettings s;
  const YAML::Node node = document["scale"];
  if (!node) return s;
  s.present = true;
  MappingReader m(node, case_file, "scale", diagnostics);
  if (!m.is_valid()) return s;
  s.factors = read_factors(m);
  s.feeds = read_feed_list(m, document);
  s.scaled_parameters = read_scaled_parameters(m, document);
  if (auto labour = m.optional_mapping("labour")) {
    s.labour.exponent = labour->number_in("exponent", 0.0, -1.0, 2.0);
    if (auto h = labour->optional_quantity<Time>("hours_per_batch")) {
      if (to_si(*h) < 0.0) labour->error("hours_per_batch", "'scale.labour.hours_per_batch' must not be negative");
      s.labour.hours_per_batch_s = to_si(*h);
    }
    labour->finish();
  }
  if (auto file = m.optional_text("continuous_case")) {
    const std::filesystem::path relative(*file);
    s.continuous_case = relative.is_absolute()
                            ? relative.string()
                            : (std::filesystem::path(case_file).parent_path() / relative).lexically_normal().string();
  }
  s.continuous_above = m.optional_number_in("continuous_above", 0.0, 1e12);
  if (s.continuous_case.has_value() != s.continuous_above.has_value())
    m.error(s.continuous_case ? "continuous_case" : "continuous_above",
            "'scale.continuous_case' and 'scale.continuous_above' go together (give both or neither)");
  m.finish();
  return s;
}

std::vector<Override> scale_overrides(const YAML::Node& document, const std::string& case_file,
                                      const ScaleSettings& settings, double factor, double base_labour_hours_s) {
  std::vector<Override> out;
  const YAML::Node feeds = document["feeds"];
  for (const auto& name : map_keys(feeds)) {
    if (!settings.feeds.empty() &&
        std::find(settings.feeds.begin(), settings.feeds.end(), name) == settings.feeds.end())
      continue;
    scale_amounts(feeds[name], "feeds." + name, case_file, factor, out);
  }
  // The starting values of tear streams grow with the feeds, so that the
  // recycle starts near its answer at every size.
  const YAML::Node estimates = document["solver"] ? document["solver"]["initial_estimates"] : YAML::Node();
  for (const auto& name : map_keys(estimates))
    scale_amounts(estimates[name], "solver.initial_estimates." + name, case_file, factor, out);

  for (const auto& p : settings.scaled_parameters) {
    const PathLookup found = look_up(document, p.path);
    if (!found.problem.empty()) throw InputError(p.where, "'" + p.path + "': " + found.problem);
    out.push_back({p.path, scaled_quantity_text(found.node.Scalar(), std::pow(factor, p.exponent),
                                                location_of(found.node, case_file), p.path)});
  }
  if (base_labour_hours_s > 0.0 && document["prices"] && document["prices"].IsMap())
    out.push_back({"prices.labour_hours_per_batch",
                   number_text(labour_hours_at(base_labour_hours_s, settings.labour, factor) / 3600.0) + " h"});
  return out;
}

ScaleLadder run_scale_ladder(const PreparedCase& prepared, const std::vector<Override>& user_overrides,
                             const std::optional<std::vector<double>>& factors_override) {
  // A fresh parse rather than YAML::Clone, which drops the line and column
  // marks that messages about the scale section need.
  YAML::Node document = load_yaml_file(prepared.path()).root;
  apply_overrides(document, user_overrides);

  ScaleLadder ladder;
  ladder.case_file = prepared.path();
  const YAML::Node& read_only = document;  // const lookups never add keys to the document
  if (read_only["case"] && read_only["case"]["title"] && read_only["case"]["title"].IsScalar())
    ladder.title = read_only["case"]["title"].Scalar();
  DiagnosticList diagnostics;
  ladder.settings = read_scale_settings(document, prepared.path(), diagnostics);
  diagnostics.throw_if_errors();
  ScaleSettings& s = ladder.settings;
  if (factors_override) {
    s.factors = *factors_override;
    std::sort(s.factors.begin(), s.factors.end());
    s.factors.erase(std::unique(s.factors.begin(), s.factors.end()), s.factors.end());
  }
  if (!s.present)
    ladder.notes.push_back("the case has no scale section: only the feeds are scaled (docs/scale-and-sweep.md)");
  for (auto& n : unscaled_size_notes(document, s)) ladder.notes.push_back(std::move(n));

  const double labour_base = labour_base_hours_s(document, prepared.path(), s.labour);
  auto batch_rung = [&](double factor) {
    ScaleRung rung;
    rung.factor = factor;
    rung.case_file = prepared.path();
    rung.multiplier = factor;
    try {
      fill_rung(rung, evaluate_study_point(prepared, scale_overrides(document, prepared.path(), s, factor, labour_base)),
                labour_hours_at(labour_base, s.labour, factor));
    } catch (const InputError& e) {
      rung.status = StudyPointStatus::bad_input;
      rung.error = describe_input_error(e);
    }
    return rung;
  };

  bool any_continuous = false;
  for (double f : s.factors) {
    if (s.continuous_above && f > *s.continuous_above) {
      any_continuous = true;
      continue;
    }
    ladder.rungs.push_back(batch_rung(f));
  }
  if (!any_continuous) return ladder;

  // Above the switch: the continuous case at the same annual monomer output,
  //   batch monomer(f = 1) x f x batches per year = monomer per hour x operating hours per year.
  // The batch output at f is taken as f times that at f = 1 (feeds scale
  // linearly); the rung reports the output it reached.
  std::optional<ScaleRung> reference;
  for (const auto& r : ladder.rungs)
    if (r.factor == 1.0) reference = r;
  if (!reference) reference = batch_rung(1.0);

  auto fail_continuous = [&](StudyPointStatus status, const std::string& error) {
    for (double f : s.factors) {
      if (!(f > *s.continuous_above)) continue;
      ScaleRung rung;
      rung.factor = f;
      rung.continuous = true;
      rung.case_file = *s.continuous_case;
      rung.status = status;
      rung.error = error;
      ladder.rungs.push_back(rung);
    }
  };
  if (reference->status != StudyPointStatus::solved || !reference->annual_monomer_kg) {
    fail_continuous(reference->status == StudyPointStatus::solved ? StudyPointStatus::bad_input : reference->status,
                    "cannot match the continuous throughput: the batch case at factor 1 " +
                        (reference->status == StudyPointStatus::solved ? std::string("names no monomer")
                                                                       : "failed: " + reference->error));
    return ladder;
  }

  std::optional<PreparedCase> continuous;
  try {
    continuous.emplace(*s.continuous_case);
  } catch (const InputError& e) {
    fail_continuous(StudyPointStatus::bad_input, describe_input_error(e));
    return ladder;
  }
  const YAML::Node& continuous_document = continuous->document();
  DiagnosticList continuous_diagnostics;
  ScaleSettings cs = read_scale_settings(continuous_document, *s.continuous_case, continuous_diagnostics);
  if (continuous_diagnostics.has_errors()) {
    fail_continuous(StudyPointStatus::bad_input, describe_input_error(InputError(continuous_diagnostics.all())));
    return ladder;
  }
  if (!continuous_document["scale"] || !continuous_document["scale"]["labour"]) cs.labour.exponent = s.labour.exponent;
  const double continuous_labour = labour_base_hours_s(continuous_document, *s.continuous_case, cs.labour);

  StudyOutcome base = evaluate_study_point(*continuous, {});
  if (!base.evaluation || !base.evaluation->report.monomer_kg || *base.evaluation->report.monomer_kg <= 0.0) {
    fail_continuous(base.evaluation ? StudyPointStatus::bad_input : base.status,
                    base.evaluation ? "cannot match the throughput: the continuous case makes no monomer"
                                    : "the continuous case at its own size failed: " + base.error);
    return ladder;
  }
  const double continuous_annual = *base.evaluation->report.monomer_kg * periods_per_year(*base.evaluation);
  for (double f : s.factors) {
    if (!(f > *s.continuous_above)) continue;
    ScaleRung rung;
    rung.factor = f;
    rung.continuous = true;
    rung.case_file = *s.continuous_case;
    rung.target_annual_monomer_kg = *reference->annual_monomer_kg * f;
    rung.multiplier = *rung.target_annual_monomer_kg / continuous_annual;
    try {
      fill_rung(rung,
                evaluate_study_point(*continuous, scale_overrides(continuous_document, *s.continuous_case, cs,
                                                             rung.multiplier, continuous_labour)),
                labour_hours_at(continuous_labour, cs.labour, rung.multiplier));
    } catch (const InputError& e) {
      rung.status = StudyPointStatus::bad_input;
      rung.error = describe_input_error(e);
    }
    ladder.rungs.push_back(rung);
  }
  return ladder;
}

}  // namespace unchain::costs
