#pragma once
// The HTML report of one solved and costed case: a single self-contained
// file (inline CSS and SVG, no script, nothing fetched) that reads on
// screen and prints on paper. Contents and how each picture is computed:
// docs/report.md.
//
// Numbers that scripts compare carry data-key and data-value attributes
// (data-value holds the number at full precision, the text shows it
// rounded), so a test can check the report against `unchain run --json`.

#include <optional>
#include <string>
#include <vector>

#include "app/safety_notes.hpp"
#include "app/svg_charts.hpp"
#include "costs/batch_economics.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"

namespace unchain::app {

// Study sections, present only when a study was run for the case. They
// hold plain numbers so that the report does not depend on the engines.
struct ScaleLadderSection {
  std::vector<svg::Point> cost_per_kg;       // x: scale factor, y: net cost per kg of monomer (currency/kg)
  std::vector<svg::Point> energy_MJ_per_kg;  // x: scale factor, y: purchased energy (MJ per kg of monomer)
  double base_scale = 1.0;                   // the case as written
  std::string note;                          // what was scaled, in a sentence
};

struct SensitivitySection {
  svg::TornadoChart chart;  // key, title and value label are filled by the report when empty
  std::string note;
};

struct MonteCarloSection {
  svg::Histogram histogram;
  std::size_t samples = 0;
  std::string note;
};

struct ReportStudies {
  std::optional<ScaleLadderSection> scale_ladder;
  std::vector<SensitivitySection> sensitivity;
  std::optional<MonteCarloSection> monte_carlo;
  [[nodiscard]] bool empty() const { return !scale_ladder && sensitivity.empty() && !monte_carlo; }
};

struct ReportInputs {
  const Case& c;
  const SolveResult& result;
  const costs::CostReport& costs;
  const CaseCautions& cautions;
  const ReportStudies& studies;
  std::string program_version = "unchain 0.1.0";
};

std::string report_html(const ReportInputs& inputs);

}  // namespace unchain::app
