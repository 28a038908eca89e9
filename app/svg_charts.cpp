#include "app/svg_charts.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <functional>
#include <numeric>

#include "app/svg_writer.hpp"

namespace unchain::app::svg {

namespace {

// Colours that stay distinct for the common forms of colour blindness and
// in greyscale print (light to dark alternate).
constexpr const char* palette[] = {"#1f5f8b", "#e3a33b", "#3f9b6e", "#b5547c", "#7fb8dc", "#c4602a", "#6c6c6c"};
const char* colour(std::size_t i) { return palette[i % std::size(palette)]; }

// A value for a label: three significant figures, without exponent for
// ordinary magnitudes.
std::string value_text(double v) {
  const double a = std::abs(v);
  if (a == 0) return "0";
  if (a >= 1e6 || a < 1e-3) return fmt::format("{:.3g}", v);
  if (a >= 100) return fmt::format("{:.0f}", v);
  if (a >= 10) return fmt::format("{:.1f}", v);
  if (a >= 1) return fmt::format("{:.2f}", v);
  return fmt::format("{:.3f}", v);
}

std::string data_value(double v) { return fmt::format("data-value=\"{:.12g}\"", v); }

constexpr double label_width = 190;  // room for row labels on horizontal charts
constexpr double chart_width = 780;
constexpr double plot_right = chart_width - 70;

}  // namespace

std::string stacked_bar_chart(const StackedBarChart& chart) {
  const double row_height = 26, bar_height = 16;
  const double legend_height = chart.kinds.empty() ? 0 : 28;
  const double top = 14 + legend_height + (chart.marker ? 18 : 0);
  const double plot_bottom = top + row_height * static_cast<double>(chart.rows.size());
  const double height = plot_bottom + 48;

  double largest = 0;
  for (const auto& row : chart.rows) {
    double total = 0;
    for (const auto& s : row.segments) total += std::max(s.value, 0.0);
    largest = std::max(largest, total);
  }
  if (chart.marker) largest = std::max(largest, chart.marker->value);
  const Ticks ticks = nice_ticks(0, largest > 0 ? largest : 1, 6);
  const LinearScale x{0, ticks.last, label_width, plot_right};

  Writer w(chart_width, height, chart.key, chart.title);
  // Legend: swatch and name per kind, in one line.
  double lx = label_width;
  for (std::size_t k = 0; k < chart.kinds.size(); ++k) {
    w.rect(lx, 10, 12, 12, "swatch", fmt::format("fill=\"{}\"", colour(k)));
    w.text(lx + 16, 20, chart.kinds[k], Anchor::start, "legend");
    lx += 26 + 7.0 * static_cast<double>(chart.kinds[k].size());
  }
  w.x_axis(x, ticks.values, plot_bottom, chart.value_label, top - 4);

  for (std::size_t r = 0; r < chart.rows.size(); ++r) {
    const BarRow& row = chart.rows[r];
    const double y = top + row_height * static_cast<double>(r) + (row_height - bar_height) / 2;
    w.text(label_width - 8, y + bar_height - 3, row.label, Anchor::end, row.emphasised ? "row-label strong" : "row-label");
    double at = 0;
    for (const auto& s : row.segments) {
      const double v = std::max(s.value, 0.0);
      const auto kind = static_cast<std::size_t>(
          std::find(chart.kinds.begin(), chart.kinds.end(), s.kind) - chart.kinds.begin());
      if (v > 0) {
        w.open_group("bar");
        w.title(fmt::format("{}: {} {}", row.label, s.kind, value_text(v)));
        w.rect(x(at), y, x(at + v) - x(at), bar_height, "bar-segment",
               fmt::format("fill=\"{}\" {} data-row=\"{}\" data-kind=\"{}\"", colour(kind), data_value(v),
                           escape(row.label), escape(s.kind)));
        w.close_group();
      }
      at += v;
    }
    w.text(x(at) + 5, y + bar_height - 3, value_text(at), Anchor::start, "bar-value",
           fmt::format("data-key=\"row-total\" {}", data_value(at)));
  }
  if (chart.marker) {
    const double mx = x(chart.marker->value);
    w.line(mx, top - 16, mx, plot_bottom, "marker-line",
           fmt::format("data-key=\"marker\" {}", data_value(chart.marker->value)));
    w.text(mx + 4, top - 8, fmt::format("{} {}", chart.marker->label, value_text(chart.marker->value)), Anchor::start,
           "marker-label");
  }
  return w.finish();
}

std::string signed_bar_chart(const SignedBarChart& chart) {
  const double row_height = 24, bar_height = 15, top = 12;
  const double plot_bottom = top + row_height * static_cast<double>(chart.bars.size());
  const double height = plot_bottom + 48;
  double low = 0, high = 0;
  for (const auto& b : chart.bars) low = std::min(low, b.value), high = std::max(high, b.value);
  if (low == 0 && high == 0) high = 1;
  const Ticks ticks = nice_ticks(low, high, 6);
  const LinearScale x{ticks.first, ticks.last, label_width, plot_right};

  Writer w(chart_width, height, chart.key, chart.title);
  w.x_axis(x, ticks.values, plot_bottom, chart.value_label, top - 4);
  w.line(x(0), top - 4, x(0), plot_bottom, "zero-line");
  for (std::size_t r = 0; r < chart.bars.size(); ++r) {
    const SignedBar& b = chart.bars[r];
    const double y = top + row_height * static_cast<double>(r) + (row_height - bar_height) / 2;
    w.text(label_width - 8, y + bar_height - 3, b.label, Anchor::end, "row-label");
    const double x0 = x(std::min(0.0, b.value)), x1 = x(std::max(0.0, b.value));
    w.rect(x0, y, x1 - x0, bar_height, b.value < 0 ? "bar-credit" : "bar-cost",
           fmt::format("fill=\"{}\" {} data-row=\"{}\"", b.value < 0 ? colour(2) : colour(0), data_value(b.value),
                       escape(b.label)));
    const bool negative = b.value < 0;
    w.text(negative ? x0 - 5 : x1 + 5, y + bar_height - 3, value_text(b.value), negative ? Anchor::end : Anchor::start,
           "bar-value");
  }
  return w.finish();
}

std::string line_chart(const LineChart& chart) {
  const double width = 560, height = 310;
  const double left = 78, right = width - 24, top = 20, bottom = height - 56;
  std::vector<Point> points;
  for (const auto& p : chart.points)
    if (std::isfinite(p.x) && std::isfinite(p.y) && (!chart.log_x || p.x > 0)) points.push_back(p);
  std::sort(points.begin(), points.end(), [](const Point& a, const Point& b) { return a.x < b.x; });

  Writer w(width, height, chart.key, chart.title);
  if (points.empty()) {
    w.text(width / 2, height / 2, "no points to draw", Anchor::middle, "note");
    return w.finish();
  }
  double ylow = 0, yhigh = 0;
  for (const auto& p : points) ylow = std::min(ylow, p.y), yhigh = std::max(yhigh, p.y);
  const Ticks yt = nice_ticks(ylow, yhigh > ylow ? yhigh : ylow + 1, 5);
  const LinearScale y{yt.first, yt.last, bottom, top};
  double xlow = points.front().x, xhigh = points.back().x;
  if (chart.x_marker) xlow = std::min(xlow, *chart.x_marker), xhigh = std::max(xhigh, *chart.x_marker);

  std::function<double(double)> x;
  if (chart.log_x) {
    // A little room at both ends, so that end points clear the axes.
    xlow /= 1.25;
    xhigh *= 1.25;
    const LogScale s{xlow, xhigh, left, right};
    w.x_axis_log(s, log_ticks(xlow, xhigh), bottom, chart.x_label, top);
    x = s;
  } else {
    const Ticks xt = nice_ticks(xlow, xhigh, 6);
    const LinearScale s{xt.first, xt.last, left, right};
    w.x_axis(s, xt.values, bottom, chart.x_label, top);
    x = s;
  }
  w.y_axis(y, yt.values, left, chart.y_label, right);
  if (chart.x_marker) {
    w.line(x(*chart.x_marker), top, x(*chart.x_marker), bottom, "marker-line");
    w.text(x(*chart.x_marker) + 4, bottom - 6, chart.x_marker_label, Anchor::start, "marker-label");
  }
  std::string d;
  for (std::size_t i = 0; i < points.size(); ++i)
    d += fmt::format("{}{} {} ", i == 0 ? "M" : "L", num(x(points[i].x)), num(y(points[i].y)));
  w.path(d, "series-line", fmt::format("fill=\"none\" stroke=\"{}\"", colour(0)));
  for (const auto& p : points) {
    w.open_group("point");
    w.title(fmt::format("{}: {}", tick_label(p.x), value_text(p.y)));
    w.raw(fmt::format("<circle cx=\"{}\" cy=\"{}\" r=\"3.5\" fill=\"{}\" data-x=\"{:.12g}\" data-y=\"{:.12g}\"/>\n",
                      num(x(p.x)), num(y(p.y)), colour(0), p.x, p.y));
    w.close_group();
  }
  return w.finish();
}

std::string tornado_chart(const TornadoChart& chart) {
  std::vector<TornadoBar> bars = chart.bars;
  std::stable_sort(bars.begin(), bars.end(), [](const TornadoBar& a, const TornadoBar& b) {
    return std::abs(a.high_result - a.low_result) > std::abs(b.high_result - b.low_result);
  });
  // Each row: the input's name, and under it its low and high values; the
  // bars of the two results start at the base line.
  constexpr double row_height = 38, bar_height = 18, top = 58, tornado_label_width = 300;
  const double plot_bottom = top + row_height * static_cast<double>(bars.size());
  const double height = plot_bottom + 48;
  double low = chart.base, high = chart.base;
  for (const auto& b : bars)
    low = std::min({low, b.low_result, b.high_result}), high = std::max({high, b.low_result, b.high_result});
  if (high == low) high = low + 1;
  const Ticks ticks = nice_ticks(low, high, 6);
  const LinearScale x{ticks.first, ticks.last, tornado_label_width, plot_right};

  Writer w(chart_width, height, chart.key, chart.title);
  w.rect(tornado_label_width, 6, 12, 12, "swatch", fmt::format("fill=\"{}\"", colour(4)));
  w.text(tornado_label_width + 16, 16, "result with the input at its low value", Anchor::start, "legend");
  w.rect(tornado_label_width, 22, 12, 12, "swatch", fmt::format("fill=\"{}\"", colour(1)));
  w.text(tornado_label_width + 16, 32, "result with the input at its high value", Anchor::start, "legend");
  w.x_axis(x, ticks.values, plot_bottom, chart.value_label, top - 4);
  for (std::size_t r = 0; r < bars.size(); ++r) {
    const TornadoBar& b = bars[r];
    const double row_top = top + row_height * static_cast<double>(r);
    const double y = row_top + (row_height - bar_height) / 2;
    w.text(tornado_label_width - 8, row_top + 15, b.label, Anchor::end, "row-label");
    if (!b.low_input.empty() || !b.high_input.empty())
      w.text(tornado_label_width - 8, row_top + 29, fmt::format("low {}, high {}", b.low_input, b.high_input),
             Anchor::end, "tick");
    const auto draw = [&](double result, const std::string& input, const char* which, const char* fill) {
      const double x0 = x(std::min(chart.base, result)), x1 = x(std::max(chart.base, result));
      w.open_group("bar");
      w.title(fmt::format("{} at {}: {}", b.label, input, value_text(result)));
      w.rect(x0, y, x1 - x0, bar_height, which,
             fmt::format("fill=\"{}\" data-key=\"{}\" {} data-row=\"{}\"", fill, which, data_value(result),
                         escape(b.label)));
      w.close_group();
    };
    // When both results lie on one side of the base, the longer bar goes
    // first so that the shorter stays visible on top of it.
    const bool low_first = std::abs(b.low_result - chart.base) >= std::abs(b.high_result - chart.base);
    if (low_first) {
      draw(b.low_result, b.low_input, "low", colour(4));
      draw(b.high_result, b.high_input, "high", colour(1));
    } else {
      draw(b.high_result, b.high_input, "high", colour(1));
      draw(b.low_result, b.low_input, "low", colour(4));
    }
    const double far_right = x(std::max({chart.base, b.low_result, b.high_result}));
    w.text(far_right + 5, y + bar_height - 4, fmt::format("swing {}", value_text(std::abs(b.high_result - b.low_result))),
           Anchor::start, "bar-value");
  }
  w.line(x(chart.base), top - 4, x(chart.base), plot_bottom, "base-line",
         fmt::format("data-key=\"base\" {}", data_value(chart.base)));
  w.text(x(chart.base), top - 8, fmt::format("base {}", value_text(chart.base)), Anchor::middle, "marker-label");
  return w.finish();
}

std::string histogram_chart(const Histogram& chart) {
  const double width = 640, height = 320;
  const double left = 70, right = width - 24, top = 34, bottom = height - 56;
  Writer w(width, height, chart.key, chart.title);
  if (chart.edges.size() < 2 || chart.counts.size() + 1 != chart.edges.size()) {
    w.text(width / 2, height / 2, "no samples to draw", Anchor::middle, "note");
    return w.finish();
  }
  const double most = *std::max_element(chart.counts.begin(), chart.counts.end());
  const Ticks yt = nice_ticks(0, most > 0 ? most : 1, 5);
  const LinearScale y{0, yt.last, bottom, top};
  const Ticks xt = nice_ticks(chart.edges.front(), chart.edges.back(), 6);
  const LinearScale x{xt.first, xt.last, left, right};
  w.x_axis(x, xt.values, bottom, chart.value_label, std::nullopt);
  w.y_axis(y, yt.values, left, "samples per bin", right);
  for (std::size_t i = 0; i < chart.counts.size(); ++i) {
    const double x0 = x(chart.edges[i]), x1 = x(chart.edges[i + 1]);
    w.rect(x0 + 0.5, y(chart.counts[i]), std::max(x1 - x0 - 1, 0.5), bottom - y(chart.counts[i]), "bin",
           fmt::format("fill=\"{}\" data-count=\"{:.12g}\" data-low=\"{:.12g}\" data-high=\"{:.12g}\"", colour(4),
                       chart.counts[i], chart.edges[i], chart.edges[i + 1]));
  }
  const struct {
    const char* name;
    double value;
  } marks[] = {{"P10", chart.p10}, {"P50", chart.p50}, {"P90", chart.p90}};
  for (std::size_t i = 0; i < std::size(marks); ++i) {
    const double mx = x(marks[i].value);
    w.line(mx, top - 6, mx, bottom, "marker-line",
           fmt::format("data-key=\"{}\" {}", marks[i].name, data_value(marks[i].value)));
    // Stagger the labels so that close percentiles stay readable.
    w.text(mx, top - 10 - 12.0 * static_cast<double>(i % 2), fmt::format("{} {}", marks[i].name, value_text(marks[i].value)),
           Anchor::middle, "marker-label");
  }
  return w.finish();
}

}  // namespace unchain::app::svg
