#pragma once
// Charts for the HTML report, each drawn from a plain data struct into one
// self-contained <svg> element (see svg_writer.hpp). The structs know
// nothing of the engines that fill them, so a study (scale ladder,
// sensitivity, Monte Carlo) only has to produce numbers.
//
// Every bar, point and marker carries data-* attributes with its value, so
// that tests and scripts can read the numbers back from the picture.

#include <optional>
#include <string>
#include <vector>

namespace unchain::app::svg {

// --- Horizontal stacked bars (energy by block and kind) -------------------

struct BarSegment {
  std::string kind;   // one of StackedBarChart::kinds
  double value = 0;   // >= 0; negative values are drawn as zero
};

struct BarRow {
  std::string label;
  std::vector<BarSegment> segments;
  bool emphasised = false;  // a total row, drawn bold
};

struct BarMarker {
  std::string label;
  double value = 0;
};

struct StackedBarChart {
  std::string key;          // data-key of the <svg>
  std::string title;
  std::string value_label;  // axis label with its unit: "energy (MJ per kg of monomer)"
  std::vector<std::string> kinds;  // legend order; colours follow it
  std::vector<BarRow> rows;
  std::optional<BarMarker> marker;  // a vertical line across the rows
};

std::string stacked_bar_chart(const StackedBarChart& chart);

// --- Horizontal signed bars (costs and credits) ---------------------------

struct SignedBar {
  std::string label;
  double value = 0;  // negative bars run left of zero
};

struct SignedBarChart {
  std::string key, title, value_label;
  std::vector<SignedBar> bars;
};

std::string signed_bar_chart(const SignedBarChart& chart);

// --- Lines over x (scale ladder) -------------------------------------------

struct Point {
  double x = 0, y = 0;
};

struct LineChart {
  std::string key, title, x_label, y_label;
  bool log_x = true;   // points with x <= 0 are left out on a log axis
  std::vector<Point> points;
  std::optional<double> x_marker;  // a vertical line (the base case, scale 1)
  std::string x_marker_label;
};

std::string line_chart(const LineChart& chart);

// --- Tornado (sensitivity) -------------------------------------------------

struct TornadoBar {
  std::string label;          // the input varied
  double low_result = 0;      // the result with the input at its low value
  double high_result = 0;     // ... at its high value
  std::string low_input, high_input;  // the input values, as text for the labels
};

struct TornadoChart {
  std::string key, title, value_label;
  double base = 0;            // the result at base values
  std::vector<TornadoBar> bars;  // drawn widest swing first
};

std::string tornado_chart(const TornadoChart& chart);

// --- Histogram (Monte Carlo) -----------------------------------------------

struct Histogram {
  std::string key, title, value_label;
  std::vector<double> edges;   // bin edges, ascending, counts.size() + 1 of them
  std::vector<double> counts;  // samples per bin
  double p10 = 0, p50 = 0, p90 = 0;
};

std::string histogram_chart(const Histogram& chart);

}  // namespace unchain::app::svg
