#include "costs/parameter_sweep.hpp"

#include <fmt/format.h>

#include <algorithm>

#include "flowsheet/unit_parser.hpp"

namespace unchain::costs {

namespace {

SourceLocation command_line() { return {"command line", 0, 0}; }

std::string trimmed(std::string_view text) {
  const auto first = text.find_first_not_of(" \t");
  if (first == std::string_view::npos) return {};
  const auto last = text.find_last_not_of(" \t");
  return std::string(text.substr(first, last - first + 1));
}

std::string dimension_text(const ParsedQuantity& q) {
  return q.unit_text.empty() ? std::string("a bare number") : "'" + q.unit_text + "'";
}

}  // namespace

std::size_t SweepResult::solved_count() const {
  return static_cast<std::size_t>(std::count_if(points.begin(), points.end(), [](const SweepPoint& p) {
    return p.status == StudyPointStatus::solved;
  }));
}

SweepSetting parse_sweep_setting(std::string_view text) {
  const Override o = parse_override(text);  // checks '=' and the path
  SweepSetting s;
  s.path = o.path;
  const std::string value = trimmed(o.value);
  if (!value.empty() && (value.front() == '[' || value.front() == '{')) {
    s.values.push_back(value);  // one YAML list or mapping: not a list of sweep values
    return s;
  }
  std::size_t start = 0;
  while (true) {
    const auto comma = value.find(',', start);
    const std::string item = trimmed(std::string_view(value).substr(start, comma == std::string::npos
                                                                               ? std::string::npos
                                                                               : comma - start));
    if (item.empty())
      throw InputError(command_line(),
                       fmt::format("--set '{}': empty value in the list '{}' (expected VALUE or V1,V2,... such as "
                                   "\"450 degC,500 degC\")",
                                   s.path, o.value));
    s.values.push_back(item);
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  return s;
}

void check_sweep_values(const SweepSetting& setting) {
  std::optional<ParsedQuantity> first;
  std::string first_text;
  for (const auto& v : setting.values) {
    ParsedQuantity q;
    try {
      q = parse_quantity(v);
    } catch (const UnitError&) {
      // A name or a YAML value: the loader judges it. But a list that mixes
      // quantities with words is a mistake in the list itself.
      if (first)
        throw InputError(command_line(),
                         fmt::format("--set '{}': '{}' is not a quantity like the others in the list (expected "
                                     "the dimension of '{}')",
                                     setting.path, v, first_text));
      continue;
    }
    if (!first) {
      if (&v != &setting.values.front()) {
        throw InputError(command_line(), fmt::format("--set '{}': '{}' is a quantity but '{}' is not (expected "
                                                     "values of one kind)",
                                                     setting.path, v, setting.values.front()));
      }
      first = q;
      first_text = v;
      continue;
    }
    if (!(q.dimension == first->dimension) ||
        q.currency != first->currency)
      throw InputError(command_line(),
                       fmt::format("--set '{}': '{}' ({}) and '{}' ({}) are of different dimensions (expected "
                                   "values of one dimension)",
                                   setting.path, first_text, dimension_text(*first), v, dimension_text(q)));
  }
}

std::vector<std::vector<Override>> sweep_points(const std::vector<SweepSetting>& settings) {
  std::vector<Override> fixed;
  std::vector<const SweepSetting*> swept;
  for (const auto& s : settings) {
    if (s.is_swept()) swept.push_back(&s);
    else if (!s.values.empty()) fixed.push_back({s.path, s.values.front()});
  }
  if (swept.size() > max_swept_parameters)
    throw InputError(command_line(), fmt::format("{} parameters have value lists (expected at most {}: one for a "
                                                 "sweep, two for a grid; a single value is an ordinary override)",
                                                 swept.size(), max_swept_parameters));
  std::size_t count = 1;
  for (const auto* s : swept) count *= s->values.size();
  if (count > max_sweep_points)
    throw InputError(command_line(),
                     fmt::format("the sweep has {} points (expected at most {})", count, max_sweep_points));

  std::vector<std::vector<Override>> points;
  if (swept.empty()) {
    points.push_back(fixed);
    return points;
  }
  const SweepSetting& outer = *swept.front();
  for (const auto& a : outer.values) {
    if (swept.size() == 1) {
      auto point = fixed;
      point.push_back({outer.path, a});
      points.push_back(std::move(point));
      continue;
    }
    for (const auto& b : swept[1]->values) {
      auto point = fixed;
      point.push_back({outer.path, a});
      point.push_back({swept[1]->path, b});
      points.push_back(std::move(point));
    }
  }
  return points;
}

SweepResult run_sweep(const PreparedCase& prepared, const std::vector<SweepSetting>& settings) {
  SweepResult result;
  result.case_file = prepared.path();
  for (const auto& s : settings) {
    if (s.is_swept()) {
      check_sweep_values(s);
      result.swept_paths.push_back(s.path);
    } else if (!s.values.empty()) {
      result.fixed_overrides.push_back({s.path, s.values.front()});
    }
  }
  const auto points = sweep_points(settings);
  const std::size_t fixed_count = result.fixed_overrides.size();
  for (const auto& overrides : points) {
    SweepPoint point;
    for (std::size_t i = fixed_count; i < overrides.size(); ++i) point.values.push_back(overrides[i].value);
    StudyOutcome outcome = evaluate_study_point(prepared, overrides);
    point.status = outcome.status;
    point.error = std::move(outcome.error);
    if (outcome.evaluation) {
      point.figures = outcome.evaluation->figures;
      for (const auto& b : outcome.evaluation->loaded->blocks) point.block_types.push_back(b.type);
    }
    result.points.push_back(std::move(point));
  }
  return result;
}

}  // namespace unchain::costs
