#pragma once
// The scale ladder: one case evaluated at several multiples of its batch (or
// of its hourly throughput), to see how energy, cost per kg of monomer,
// capital and labour move with size. Rules (docs/scale-and-sweep.md):
//   * every feed amount (or those of the feeds listed) is multiplied by the
//     factor f, and so are the amounts of the tear-stream initial estimates;
//   * each scaled parameter (a vessel volume, a heater rating, a vessel
//     mass) is multiplied by f^exponent;
//   * the vessel outer area, and with it the heat loss, follows the volume
//     as V^(2/3) inside the vessel model (units/vessel_heating.hpp); a block
//     that is given `outer_area` directly has it scaled by f^(2/3);
//   * equipment cost follows each item's own exponent in the capital
//     estimate, because the sizes come from the solve;
//   * labour hours per batch are H f^n (n = 0: the same crew time at every
//     size);
//   * above `continuous_above`, the ladder evaluates a continuous case at
//     the same annual monomer output.

#include <optional>
#include <string>
#include <vector>

#include "costs/case_study.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/diagnostics.hpp"

namespace unchain::costs {

// A case value that grows with size as f^exponent.
struct ScaledParameter {
  std::string path;      // dotted path into the case ("blocks.reactor.reactor_volume")
  double exponent = 1.0;
  SourceLocation where;  // the entry in the scale section
};

// Labour hours per batch (per operating hour for a continuous case) at
// factor f: hours_per_batch f^exponent.
struct LabourRule {
  double exponent = 0.0;
  std::optional<double> hours_per_batch_s;  // SI seconds; absent: the case's prices.labour_hours_per_batch
};

// The `scale` section of a case.
struct ScaleSettings {
  bool present = false;
  std::vector<double> factors{1.0, 10.0, 100.0};  // > 0, ascending, no repeats
  std::vector<std::string> feeds;                 // empty: every feed
  std::vector<ScaledParameter> scaled_parameters;
  LabourRule labour;
  std::optional<std::string> continuous_case;     // resolved against the case file's folder
  std::optional<double> continuous_above;         // factors above this use the continuous case
};

// Reads `scale` from a case document; errors name file, line, column and key.
ScaleSettings read_scale_settings(const YAML::Node& document, const std::string& case_file,
                                  DiagnosticList& diagnostics);

// The default exponent of a scaled parameter from the last part of its path
// (volume and power 1, area and vessel mass 2/3), or none.
std::optional<double> default_scale_exponent(std::string_view path);

// "1.5 kg" times 2 is "3 kg": the number is multiplied and the unit kept as
// written. Bare numbers are multiplied too. Throws InputError (at `where`)
// when the text does not start with a number.
std::string scaled_quantity_text(const std::string& text, double multiplier, const SourceLocation& where,
                                 const std::string& key_path);

// The overrides that turn `document` (a case with its --set overrides
// applied) into the case at `factor`: feeds and initial estimates times the
// factor, scaled parameters times factor^exponent, labour hours by the rule
// (from `base_labour_hours_s`, skipped when zero). Throws InputError for a
// path that leads nowhere or a value that is not a number.
std::vector<Override> scale_overrides(const YAML::Node& document, const std::string& case_file,
                                      const ScaleSettings& settings, double factor, double base_labour_hours_s);

// How one evaluation of a study (a rung, a sweep point) ended.
enum class StudyPointStatus { solved, bad_input, not_converged };
const char* study_point_status_name(StudyPointStatus status);

struct StudyOutcome {
  std::optional<Evaluation> evaluation;  // when solved
  StudyPointStatus status = StudyPointStatus::solved;
  std::string error;                     // when not: the messages, one per line
};

// Evaluates with the overrides, turning input, model and convergence errors
// into a status and a message instead of an exception.
StudyOutcome evaluate_study_point(const PreparedCase& prepared, const std::vector<Override>& overrides);
// The error lines of an InputError ("FILE:LINE:COLUMN: error: ...").
std::string describe_input_error(const InputError& e);

// One size on the ladder.
struct ScaleRung {
  double factor = 1.0;
  bool continuous = false;          // evaluated on the continuous case
  std::string case_file;
  double multiplier = 1.0;          // applied to that case's feeds (continuous: matches the throughput)
  StudyPointStatus status = StudyPointStatus::solved;
  std::string error;                // when not solved
  std::optional<CaseFigures> figures;
  std::optional<double> labour_hours_per_basis;  // hours
  std::optional<double> annual_monomer_kg;       // monomer per basis x batches (or hours) per year
  std::optional<double> target_annual_monomer_kg;  // continuous rungs: the batch output to match
  std::vector<std::string> block_types;
};

struct ScaleLadder {
  std::string case_file;
  std::string title;
  ScaleSettings settings;
  std::vector<ScaleRung> rungs;
  std::vector<std::string> notes;  // rules that could not apply, things not scaled
};

// Evaluates every factor of the case's scale section (`settings_override`
// replaces the factors when given). `user_overrides` are the --set values
// the PreparedCase was built with, applied again before scaling so that the
// scaled values start from them. A rung that fails is recorded with its
// error and the ladder goes on.
ScaleLadder run_scale_ladder(const PreparedCase& prepared, const std::vector<Override>& user_overrides,
                             const std::optional<std::vector<double>>& factors_override = std::nullopt);

}  // namespace unchain::costs
