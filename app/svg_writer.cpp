#include "app/svg_writer.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

namespace unchain::app::svg {

namespace {

const char* anchor_name(Anchor a) {
  switch (a) {
    case Anchor::start: return "start";
    case Anchor::middle: return "middle";
    case Anchor::end: return "end";
  }
  return "start";
}

std::string class_attribute(std::string_view css_class) {
  return css_class.empty() ? std::string() : fmt::format(" class=\"{}\"", escape(css_class));
}

std::string extra_attributes(std::string_view extra) {
  return extra.empty() ? std::string() : " " + std::string(extra);
}

}  // namespace

std::string escape(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (const char ch : text) {
    const auto u = static_cast<unsigned char>(ch);
    switch (ch) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default:
        // XML 1.0 allows only tab, newline and carriage return below 0x20.
        if (u < 0x20 && ch != '\t' && ch != '\n' && ch != '\r') break;
        out += ch;
    }
  }
  return out;
}

std::string num(double value) {
  if (!std::isfinite(value)) return "0";
  std::string s = fmt::format("{:.2f}", value);
  if (s == "-0.00") s = "0.00";
  return s;
}

double nice_step(double rough) {
  if (!(rough > 0) || !std::isfinite(rough)) return 1.0;
  const double power = std::pow(10.0, std::floor(std::log10(rough)));
  for (const double m : {1.0, 2.0, 5.0, 10.0}) {
    // A small relative allowance so that 0.2 is not turned into 0.5 by rounding.
    if (m * power >= rough * (1 - 1e-12)) return m * power;
  }
  return 10.0 * power;
}

Ticks nice_ticks(double low, double high, int target_count) {
  if (!std::isfinite(low) || !std::isfinite(high)) low = 0, high = 1;
  if (high < low) std::swap(low, high);
  if (high == low) {
    const double pad = low == 0 ? 1.0 : std::abs(low) * 0.1;
    low -= pad;
    high += pad;
  }
  Ticks t;
  t.step = nice_step((high - low) / std::max(target_count, 1));
  t.first = std::floor(low / t.step + 1e-9) * t.step;
  t.last = std::ceil(high / t.step - 1e-9) * t.step;
  const int n = static_cast<int>(std::lround((t.last - t.first) / t.step));
  for (int i = 0; i <= n; ++i) {
    double v = t.first + i * t.step;
    if (std::abs(v) < t.step * 1e-9) v = 0.0;
    t.values.push_back(v);
  }
  return t;
}

std::vector<double> log_ticks(double low, double high) {
  std::vector<double> ticks;
  if (!(low > 0) || !(high > 0)) return ticks;
  if (high < low) std::swap(low, high);
  const int first = static_cast<int>(std::floor(std::log10(low) + 1e-9));
  const int last = static_cast<int>(std::ceil(std::log10(high) - 1e-9));
  const bool fill = std::log10(high / low) <= 2.1;  // two decades or less: 2 and 5 in between too
  for (int k = first; k <= last; ++k) {
    const double decade = std::pow(10.0, k);
    for (const double m : {1.0, 2.0, 5.0}) {
      if (m != 1.0 && !fill) continue;
      const double v = m * decade;
      if (v >= low * (1 - 1e-9) && v <= high * (1 + 1e-9)) ticks.push_back(v);
    }
  }
  return ticks;
}

std::string tick_label(double value) {
  if (value == 0) return "0";
  const double a = std::abs(value);
  if (a >= 1e6 || a < 1e-3) return fmt::format("{:.3g}", value);
  std::string s = fmt::format("{:.6f}", value);
  while (!s.empty() && s.back() == '0') s.pop_back();
  if (!s.empty() && s.back() == '.') s.pop_back();
  return s;
}

double LinearScale::operator()(double v) const {
  const double span = domain_high - domain_low;
  if (span == 0) return range_low;
  return range_low + (v - domain_low) / span * (range_high - range_low);
}

double LogScale::operator()(double v) const {
  if (!(v > 0) || !(domain_low > 0) || !(domain_high > 0) || domain_high == domain_low) return range_low;
  const double f = (std::log(v) - std::log(domain_low)) / (std::log(domain_high) - std::log(domain_low));
  return range_low + f * (range_high - range_low);
}

Writer::Writer(double width, double height, std::string_view key, std::string_view title)
    : width_(width), height_(height), key_(key), title_(title) {}

void Writer::rect(double x, double y, double w, double h, std::string_view css_class, std::string_view extra) {
  body_ += fmt::format("<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\"{}{}/>\n", num(x), num(y),
                       num(std::max(w, 0.0)), num(std::max(h, 0.0)), class_attribute(css_class),
                       extra_attributes(extra));
}

void Writer::line(double x1, double y1, double x2, double y2, std::string_view css_class, std::string_view extra) {
  body_ += fmt::format("<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\"{}{}/>\n", num(x1), num(y1), num(x2), num(y2),
                       class_attribute(css_class), extra_attributes(extra));
}

void Writer::path(std::string_view d, std::string_view css_class, std::string_view extra) {
  body_ += fmt::format("<path d=\"{}\"{}{}/>\n", escape(d), class_attribute(css_class), extra_attributes(extra));
}

void Writer::circle(double cx, double cy, double r, std::string_view css_class) {
  body_ += fmt::format("<circle cx=\"{}\" cy=\"{}\" r=\"{}\"{}/>\n", num(cx), num(cy), num(r),
                       class_attribute(css_class));
}

void Writer::text(double x, double y, std::string_view content, Anchor anchor, std::string_view css_class,
                  std::string_view extra) {
  body_ += fmt::format("<text x=\"{}\" y=\"{}\" text-anchor=\"{}\"{}{}>{}</text>\n", num(x), num(y),
                       anchor_name(anchor), class_attribute(css_class), extra_attributes(extra), escape(content));
}

void Writer::text_lines(double x, double y, const std::vector<std::string>& lines, double line_height, Anchor anchor,
                        std::string_view css_class) {
  for (std::size_t i = 0; i < lines.size(); ++i) text(x, y + static_cast<double>(i) * line_height, lines[i], anchor, css_class);
}

void Writer::open_group(std::string_view css_class, std::string_view extra) {
  body_ += fmt::format("<g{}{}>\n", class_attribute(css_class), extra_attributes(extra));
}

void Writer::close_group() { body_ += "</g>\n"; }

void Writer::title(std::string_view content) { body_ += fmt::format("<title>{}</title>\n", escape(content)); }

void Writer::raw(std::string_view markup) { body_ += markup; }

template <class Scale>
void Writer::horizontal_axis(const Scale& scale, const std::vector<double>& ticks, double y, std::string_view label,
                             std::optional<double> grid_top) {
  line(scale.range_low, y, scale.range_high, y, "axis");
  for (const double t : ticks) {
    const double x = scale(t);
    if (grid_top) line(x, *grid_top, x, y, "grid");
    line(x, y, x, y + 5, "axis");
    text(x, y + 17, tick_label(t), Anchor::middle, "tick");
  }
  if (!label.empty()) text((scale.range_low + scale.range_high) / 2, y + 34, label, Anchor::middle, "axis-label");
}

void Writer::x_axis(const LinearScale& scale, const std::vector<double>& ticks, double y, std::string_view label,
                    std::optional<double> grid_top) {
  horizontal_axis(scale, ticks, y, label, grid_top);
}

void Writer::x_axis_log(const LogScale& scale, const std::vector<double>& ticks, double y, std::string_view label,
                        std::optional<double> grid_top) {
  horizontal_axis(scale, ticks, y, label, grid_top);
}

void Writer::y_axis(const LinearScale& scale, const std::vector<double>& ticks, double x, std::string_view label,
                    std::optional<double> grid_right) {
  line(x, scale.range_low, x, scale.range_high, "axis");
  for (const double t : ticks) {
    const double y = scale(t);
    if (grid_right) line(x, y, *grid_right, y, "grid");
    line(x - 5, y, x, y, "axis");
    text(x - 8, y + 4, tick_label(t), Anchor::end, "tick");
  }
  if (!label.empty()) {
    const double cy = (scale.range_low + scale.range_high) / 2;
    text(x - 48, cy, label, Anchor::middle, "axis-label",
         fmt::format("transform=\"rotate(-90 {} {})\"", num(x - 48), num(cy)));
  }
}

std::string Writer::finish() const {
  return fmt::format(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {} {}\" width=\"{}\" height=\"{}\" "
      "data-key=\"{}\" role=\"img\" preserveAspectRatio=\"xMinYMin meet\">\n<title>{}</title>\n{}</svg>\n",
      num(width_), num(height_), num(width_), num(height_), escape(key_), escape(title_), body_);
}

std::vector<std::string> wrap_name(std::string_view name, std::size_t max_chars) {
  std::vector<std::string> lines;
  std::string current;
  std::size_t start = 0;
  // Pieces end after each break character.
  std::vector<std::string> pieces;
  for (std::size_t i = 0; i < name.size(); ++i) {
    if (name[i] == '_' || name[i] == '-' || name[i] == ' ' || name[i] == '.') {
      pieces.emplace_back(name.substr(start, i + 1 - start));
      start = i + 1;
    }
  }
  if (start < name.size()) pieces.emplace_back(name.substr(start));
  for (const auto& piece : pieces) {
    if (!current.empty() && current.size() + piece.size() > max_chars) {
      lines.push_back(current);
      current.clear();
    }
    current += piece;
  }
  if (!current.empty()) lines.push_back(current);
  for (auto& l : lines)
    while (!l.empty() && l.back() == ' ') l.pop_back();
  if (lines.empty()) lines.emplace_back();
  return lines;
}

}  // namespace unchain::app::svg
