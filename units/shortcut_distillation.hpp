#pragma once
// Continuous distillation by the Fenske-Underwood-Gilliland shortcut, for
// scale-up: minimum stages at total reflux (Fenske 1932), minimum reflux
// (Underwood 1948), stages at the operating reflux (Gilliland 1940 in the
// form of Eduljee 1975) and the feed stage (Kirkbride 1944). Total
// condenser, partial reboiler counted as a stage, constant pressure.
// Equations, assumptions and ranges: docs/blocks-separation.md#continuous-distillation.

#include <Eigen/Core>
#include <cstddef>
#include <vector>

#include "flowsheet/quantity.hpp"
#include "units/column_stages.hpp"

namespace unchain::units {

class BlockRegistry;

// Registers block type `continuous_distillation`.
void register_continuous_distillation(BlockRegistry& registry);

struct ShortcutSpecification {
  std::size_t light_key = 0;
  std::size_t heavy_key = 0;
  double light_key_recovery = 0.99;  // fraction of the light key to the distillate
  double heavy_key_recovery = 0.99;  // fraction of the heavy key to the bottoms
  double feed_condition = 1.0;       // q: liquid fraction of the feed (1 = saturated liquid)
  double reflux_to_minimum_ratio = 1.3;
};

struct ShortcutDesign {
  Eigen::VectorXd distillate;  // moles per component
  Eigen::VectorXd bottoms;
  // Relative volatilities to the heavy key: geometric mean of the values at
  // the top (dew point of the distillate) and the bottom (bubble point of
  // the bottoms).
  Eigen::VectorXd relative_volatility;
  double key_relative_volatility = 0.0;  // alpha of the light key over the heavy key
  double key_relative_volatility_top = 0.0;
  double key_relative_volatility_bottom = 0.0;
  double minimum_stages = 0.0;          // Fenske, equilibrium stages incl. the reboiler
  std::vector<double> underwood_roots;  // theta between the keys' volatilities
  double minimum_reflux = 0.0;          // Underwood, L/D
  double reflux_ratio = 0.0;
  double gilliland_abscissa = 0.0;                    // X = (R - Rmin) / (R + 1)
  double stages = 0.0;                                // equilibrium stages incl. the reboiler
  double rectifying_stages = 0.0;                     // above the feed (Kirkbride)
  int feed_stage = 0;                                 // counted from the top, the top stage being 1
  Temperature top_temperature = kelvin(0.0);          // dew point of the distillate vapour
  Temperature distillate_temperature = kelvin(0.0);   // bubble point of the distillate (reflux)
  Temperature bottom_temperature = kelvin(0.0);       // bubble point of the bottoms
  bool distributing_components_outside_feed = false;  // Underwood's d_i outside 0..f_i
  int fenske_iterations = 0;
};

// The shortcut design of a column for a feed given in moles per component
// (volatile components only; others must be zero). Throws ModelError when
// the keys are not volatile in the order given or the specification is
// impossible.
ShortcutDesign design_shortcut_column(const KValueModel& model, const Eigen::VectorXd& feed_moles,
                                      const ShortcutSpecification& specification);

// The Gilliland correlation in the form of Eduljee (Hydrocarbon Processing
// 54(9) (1975) 120): Y = (N - Nmin)/(N + 1) = 0.75 (1 - X^0.5668).
double eduljee_gilliland(double X);

}  // namespace unchain::units
