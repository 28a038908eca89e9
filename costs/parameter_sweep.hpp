#pragma once
// A parameter sweep: one case evaluated at every value of one parameter, or
// at every pair of values of two (a grid), each point a set of --set
// overrides. A point that fails keeps its row with the error; the sweep goes
// on. docs/scale-and-sweep.md.

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "costs/case_study.hpp"
#include "costs/scale_ladder.hpp"  // StudyPointStatus
#include "flowsheet/case.hpp"

namespace unchain::costs {

inline constexpr std::size_t max_swept_parameters = 2;
inline constexpr std::size_t max_sweep_points = 10000;

// "PATH=V1,V2,V3": a path and its values, as written ("450 degC").
struct SweepSetting {
  std::string path;
  std::vector<std::string> values;
  [[nodiscard]] bool is_swept() const { return values.size() > 1; }
};

// Parses "PATH=V1,V2,...". A value that starts with '[' or '{' is one YAML
// list or mapping and is not split. Throws InputError (naming the option)
// for a missing '=', an empty path, or an empty value in the list.
SweepSetting parse_sweep_setting(std::string_view text);

// When the values of a swept parameter are quantities, they must all have
// the same dimension ("450 degC,500 K" yes, "450 degC,2 kg" no); a mix is an
// InputError naming the path and both values. Values that are not
// quantities (names, bare numbers) are left to the case loader.
void check_sweep_values(const SweepSetting& setting);

// The points of a sweep: the cartesian product of the swept settings, the
// first varying slowest; every single-valued setting is added to each point
// as an ordinary override. Throws InputError when more than two settings
// are swept or the grid exceeds max_sweep_points.
std::vector<std::vector<Override>> sweep_points(const std::vector<SweepSetting>& settings);

struct SweepPoint {
  std::vector<std::string> values;  // one per swept parameter, as written
  StudyPointStatus status = StudyPointStatus::solved;
  std::string error;
  std::optional<CaseFigures> figures;
  std::vector<std::string> block_types;
};

struct SweepResult {
  std::string case_file;
  std::vector<std::string> swept_paths;   // one or two; empty when no setting is swept
  std::vector<Override> fixed_overrides;  // the single-valued settings
  std::vector<SweepPoint> points;

  [[nodiscard]] std::size_t solved_count() const;
};

// Evaluates every point (in order). `prepared` carries no overrides of its
// own: the settings are applied per point.
SweepResult run_sweep(const PreparedCase& prepared, const std::vector<SweepSetting>& settings);

}  // namespace unchain::costs
