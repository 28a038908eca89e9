#pragma once
// Small building blocks for the inline SVG pictures of the HTML report:
// XML escaping, number formatting for attributes, linear and logarithmic
// scales, "nice" axis ticks, and a writer that collects elements into one
// <svg> document. Nothing here knows about flowsheets or costs.

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace unchain::app::svg {

// Escapes &, <, >, " and ' for XML text and attribute values. Control
// characters that XML 1.0 forbids are dropped, so any case text is safe.
std::string escape(std::string_view text);

// A number for an SVG attribute: fixed, two decimals, no "-0.00".
std::string num(double value);

// Ticks at 1, 2 or 5 times a power of ten covering [low, high]. The first
// tick is at or below `low`, the last at or above `high`, and there are
// about `target_count` intervals between them.
struct Ticks {
  double first = 0;
  double last = 1;
  double step = 1;
  std::vector<double> values;
};
Ticks nice_ticks(double low, double high, int target_count = 5);
// The "nice" step itself: 1, 2 or 5 x 10^k, the smallest not below `rough`.
double nice_step(double rough);

// Decade ticks (1, 10, 100 ... and, for short ranges, 2 and 5 between) for a
// logarithmic axis over [low, high], both positive.
std::vector<double> log_ticks(double low, double high);

// A tick label: few significant digits, no trailing zeros ("0.5", "20", "1e+06").
std::string tick_label(double value);

// Maps a value interval onto a pixel interval.
struct LinearScale {
  double domain_low = 0, domain_high = 1, range_low = 0, range_high = 1;
  [[nodiscard]] double operator()(double v) const;
};
struct LogScale {
  double domain_low = 1, domain_high = 10, range_low = 0, range_high = 1;  // domain positive
  [[nodiscard]] double operator()(double v) const;
};

enum class Anchor { start, middle, end };

// Collects SVG elements. Every text given is escaped here; attributes in
// `extra` are written as they are (callers build them with escape()).
class Writer {
 public:
  // `key` becomes the data-key attribute of the <svg> element (for tests
  // and scripts that look for a picture); `title` its accessible <title>.
  Writer(double width, double height, std::string_view key, std::string_view title);

  void rect(double x, double y, double w, double h, std::string_view css_class, std::string_view extra = {});
  void line(double x1, double y1, double x2, double y2, std::string_view css_class, std::string_view extra = {});
  void path(std::string_view d, std::string_view css_class, std::string_view extra = {});
  void circle(double cx, double cy, double r, std::string_view css_class);
  void text(double x, double y, std::string_view content, Anchor anchor = Anchor::start,
            std::string_view css_class = {}, std::string_view extra = {});
  // Several lines of text, the first at y, each `line_height` below the last.
  void text_lines(double x, double y, const std::vector<std::string>& lines, double line_height,
                  Anchor anchor = Anchor::start, std::string_view css_class = {});
  void open_group(std::string_view css_class, std::string_view extra = {});
  void close_group();
  // A tooltip for the element just before it is not possible in plain SVG
  // without nesting, so hover texts go through open_group + title().
  void title(std::string_view content);
  void raw(std::string_view markup);  // already well-formed markup (defs)

  // Horizontal axis at pixel row `y` from the scale's range, tick marks and
  // labels below, `label` under them; grid lines up to `grid_top` if given.
  void x_axis(const LinearScale& scale, const std::vector<double>& ticks, double y, std::string_view label,
              std::optional<double> grid_top = std::nullopt);
  void x_axis_log(const LogScale& scale, const std::vector<double>& ticks, double y, std::string_view label,
                  std::optional<double> grid_top = std::nullopt);
  // Vertical axis at pixel column `x`, labels to its left, grid to `grid_right`.
  void y_axis(const LinearScale& scale, const std::vector<double>& ticks, double x, std::string_view label,
              std::optional<double> grid_right = std::nullopt);

  [[nodiscard]] std::string finish() const;  // the whole <svg> element

 private:
  // The body of both horizontal axes; instantiated in svg_writer.cpp only.
  template <class Scale>
  void horizontal_axis(const Scale& scale, const std::vector<double>& ticks, double y, std::string_view label,
                       std::optional<double> grid_top);

  double width_, height_;
  std::string key_, title_;
  std::string body_;
};

// Splits a name into lines of at most `max_chars`, breaking after '_', '-',
// '.' or ' ' where possible (names stay whole otherwise).
std::vector<std::string> wrap_name(std::string_view name, std::size_t max_chars);

}  // namespace unchain::app::svg
