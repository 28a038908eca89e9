#include "app/svg_flow_diagram.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <set>

#include "app/svg_writer.hpp"

namespace unchain::app {

namespace {

using svg::Anchor;
using svg::num;

// Geometry, in SVG user units (about pixels at full width).
constexpr double box_width = 116;
constexpr double column_gap = 118;
constexpr double port_pitch = 30;
constexpr double min_box_height = 64;
constexpr double label_row = 16;   // one row of feed or product labels
constexpr double lane_pitch = 30;  // one recycle or bypass lane
constexpr double margin = 24;
constexpr std::size_t label_chars = 13;

enum class Route { feed, product, forward, bypass, recycle };

struct Edge {
  std::size_t stream = 0;
  Route route = Route::forward;
  bool tear = false;
};

struct Port {
  std::size_t stream = 0;
  Route route = Route::forward;
};

// The order of ports on a side is chosen so that lines do not cross:
// left side feeds, then forward inlets, then recycles (bottom); right side
// forward and bypass outlets, then products, then recycles (bottom).
int left_rank(Route r) { return r == Route::feed ? 0 : r == Route::recycle ? 2 : 1; }
int right_rank(Route r) { return r == Route::product ? 1 : r == Route::recycle ? 2 : 0; }

std::vector<std::size_t> block_order(const Case& c, const SolveResult& result) {
  std::vector<std::size_t> order;
  std::set<std::size_t> seen;
  for (const auto& name : result.calculation_order)
    if (const auto i = c.block_index(name); i && seen.insert(*i).second) order.push_back(*i);
  for (std::size_t i = 0; i < c.blocks.size(); ++i)
    if (seen.insert(i).second) order.push_back(i);
  return order;
}

std::set<std::size_t> tear_set(const Case& c, const SolveResult& result) {
  std::set<std::size_t> tears;
  for (const auto& name : result.tear_streams)
    if (const auto i = c.stream_index(name)) tears.insert(*i);
  return tears;
}

}  // namespace

std::vector<BlockPlacement> place_blocks(const Case& c, const SolveResult& result) {
  const auto order = block_order(c, result);
  const auto tears = tear_set(c, result);
  std::vector<BlockPlacement> placement(c.blocks.size());
  std::vector<bool> placed(c.blocks.size(), false);
  std::map<std::size_t, std::size_t> rows_in_column;
  for (const std::size_t b : order) {
    std::size_t column = 0;
    for (const auto& [role, streams] : c.blocks[b].inlets)
      for (const std::size_t s : streams) {
        const auto& source = c.streams[s].source;
        // Tear streams and streams from blocks not yet calculated are the
        // recycles; they do not push a block to the right.
        if (!source || *source == b || tears.count(s) || !placed[*source]) continue;
        column = std::max(column, placement[*source].column + 1);
      }
    placement[b].column = column;
    placement[b].row = rows_in_column[column]++;
    placed[b] = true;
  }
  return placement;
}

std::string flow_diagram_svg(const Case& c, const SolveResult& result) {
  const auto placement = place_blocks(c, result);
  const auto tears = tear_set(c, result);
  const std::size_t n_blocks = c.blocks.size();

  // Classify every stream by how it is drawn.
  std::vector<Edge> edges;
  for (std::size_t s = 0; s < c.streams.size(); ++s) {
    const StreamInfo& info = c.streams[s];
    Edge e{s, Route::forward, tears.count(s) > 0};
    if (!info.source && !info.destination) continue;  // a feed that goes nowhere
    if (!info.source) e.route = Route::feed;
    else if (!info.destination) e.route = Route::product;
    else {
      const auto& from = placement[*info.source];
      const auto& to = placement[*info.destination];
      if (to.column <= from.column) e.route = Route::recycle;
      else if (to.column == from.column + 1) e.route = Route::forward;
      else e.route = Route::bypass;
    }
    edges.push_back(e);
  }

  std::vector<std::vector<Port>> left(n_blocks), right(n_blocks);
  for (const auto& e : edges) {
    const StreamInfo& info = c.streams[e.stream];
    if (info.destination) left[*info.destination].push_back({e.stream, e.route});
    if (info.source) right[*info.source].push_back({e.stream, e.route});
  }
  for (auto& ports : left)
    std::stable_sort(ports.begin(), ports.end(), [](const Port& a, const Port& b) { return left_rank(a.route) < left_rank(b.route); });
  for (auto& ports : right)
    std::stable_sort(ports.begin(), ports.end(), [](const Port& a, const Port& b) { return right_rank(a.route) < right_rank(b.route); });

  std::size_t columns = 1, rows = 1, max_feeds = 0, max_products = 0, bypasses = 0, recycles = 0;
  double box_height = min_box_height;
  for (std::size_t b = 0; b < n_blocks; ++b) {
    columns = std::max(columns, placement[b].column + 1);
    rows = std::max(rows, placement[b].row + 1);
    const auto count = [](const std::vector<Port>& ports, Route r) {
      return static_cast<std::size_t>(std::count_if(ports.begin(), ports.end(), [r](const Port& p) { return p.route == r; }));
    };
    max_feeds = std::max(max_feeds, count(left[b], Route::feed));
    max_products = std::max(max_products, count(right[b], Route::product));
    box_height = std::max(box_height, port_pitch * static_cast<double>(std::max(left[b].size(), right[b].size())) + 24);
  }
  for (const auto& e : edges) bypasses += e.route == Route::bypass, recycles += e.route == Route::recycle;

  const double bypass_band = lane_pitch * static_cast<double>(bypasses);
  const double top_band = label_row * static_cast<double>(max_feeds) + 16;
  const double bottom_band = label_row * static_cast<double>(max_products) + 22;
  const double row_pitch = top_band + box_height + bottom_band;
  const double first_row_top = margin + bypass_band + top_band;
  const double boxes_bottom = first_row_top + row_pitch * static_cast<double>(rows - 1) + box_height + bottom_band;
  const double width = 2 * margin + 60 + static_cast<double>(columns) * box_width +
                       static_cast<double>(columns - 1) * column_gap + 130;
  const double height = boxes_bottom + lane_pitch * static_cast<double>(recycles) + margin;

  const auto box_left = [&](std::size_t b) {
    return margin + 60 + static_cast<double>(placement[b].column) * (box_width + column_gap);
  };
  const auto box_top = [&](std::size_t b) { return first_row_top + static_cast<double>(placement[b].row) * row_pitch; };
  const auto port_y = [&](std::size_t b, const std::vector<Port>& ports, std::size_t stream) {
    std::size_t i = 0;
    while (i < ports.size() && ports[i].stream != stream) ++i;
    const double span = port_pitch * static_cast<double>(ports.size() - 1);
    return box_top(b) + (box_height - span) / 2 + port_pitch * static_cast<double>(i);
  };

  svg::Writer w(width, height, "flow-diagram", c.title.empty() ? "Block flow diagram" : "Block flow diagram: " + c.title);
  w.raw(
      "<defs><marker id=\"flow-arrow\" viewBox=\"0 0 10 10\" refX=\"9\" refY=\"5\" markerWidth=\"7\" "
      "markerHeight=\"7\" orient=\"auto-start-reverse\"><path d=\"M0 0 L10 5 L0 10 z\" fill=\"#333\"/></marker></defs>\n");

  const auto stream_group = [&](const Edge& e) {
    const StreamInfo& info = c.streams[e.stream];
    const double kg = e.stream < result.streams.size() && result.streams[e.stream].has_components()
                          ? to_si(result.streams[e.stream].total_mass())
                          : 0.0;
    const char* css = e.route == Route::recycle || e.tear ? "stream recycle" : "stream";
    w.open_group(css, fmt::format("data-key=\"stream\" data-stream=\"{}\"", svg::escape(info.name)));
    w.title(fmt::format("{}: {:.4g} kg{}", info.name, kg, e.tear ? " (tear stream)" : ""));
  };
  const auto draw_path = [&](const std::string& d, bool dashed) {
    w.path(d, dashed ? "flow-line dashed" : "flow-line", "fill=\"none\" marker-end=\"url(#flow-arrow)\"");
  };

  std::map<std::size_t, std::size_t> feed_index, product_index;  // per block, counted as drawn
  std::map<std::size_t, std::vector<std::size_t>> gap_edges;     // forward streams per gap (source column)
  for (const auto& e : edges)
    if (e.route == Route::forward) gap_edges[placement[*c.streams[e.stream].source].column].push_back(e.stream);
  std::size_t bypass_lane = 0, recycle_lane = 0;

  for (const auto& e : edges) {
    const StreamInfo& info = c.streams[e.stream];
    const auto name_lines = svg::wrap_name(info.name, label_chars);
    stream_group(e);
    switch (e.route) {
      case Route::feed: {
        const std::size_t b = *info.destination;
        const std::size_t k = feed_index[b]++;
        const double x = box_left(b) - 16 - 12 * static_cast<double>(k);
        const double label_y = box_top(b) - 8 - label_row * static_cast<double>(k);
        const double y = port_y(b, left[b], e.stream);
        draw_path(fmt::format("M{} {} L{} {} L{} {}", num(x), num(label_y + 4), num(x), num(y), num(box_left(b)), num(y)),
                  e.tear);
        w.text(x - 3, label_y, info.name, Anchor::start, "stream-label feed-label");
        break;
      }
      case Route::product: {
        const std::size_t b = *info.source;
        std::size_t n = 0;
        for (const auto& p : right[b]) n += p.route == Route::product;
        const std::size_t k = product_index[b]++;
        const double x = box_left(b) + box_width + 16 + 12 * static_cast<double>(n - 1 - k);
        const double label_y = box_top(b) + box_height + 16 + label_row * static_cast<double>(k);
        const double y = port_y(b, right[b], e.stream);
        draw_path(fmt::format("M{} {} L{} {} L{} {}", num(box_left(b) + box_width), num(y), num(x), num(y), num(x),
                              num(label_y - 11)),
                  e.tear);
        w.text(x - 3, label_y, info.name, Anchor::start, "stream-label product-label");
        break;
      }
      case Route::forward: {
        const std::size_t from = *info.source, to = *info.destination;
        const auto& in_gap = gap_edges[placement[from].column];
        const auto i = static_cast<double>(std::find(in_gap.begin(), in_gap.end(), e.stream) - in_gap.begin());
        const double x1 = box_left(from) + box_width, x2 = box_left(to);
        const double xm = (x1 + x2) / 2 + 8 * (i - static_cast<double>(in_gap.size() - 1) / 2);
        const double y1 = port_y(from, right[from], e.stream), y2 = port_y(to, left[to], e.stream);
        draw_path(fmt::format("M{} {} L{} {} L{} {} L{} {}", num(x1), num(y1), num(xm), num(y1), num(xm), num(y2),
                              num(x2), num(y2)),
                  e.tear);
        // A straight stream is labelled in the middle of the gap. One that
        // steps is labelled above its upper run (leaving the source when it
        // steps down, entering the destination when it steps up): the step
        // then lies below the label and never crosses it.
        const double lines_above = 13 * static_cast<double>(name_lines.size() - 1);
        if (std::abs(y1 - y2) < 1)
          w.text_lines((x1 + x2) / 2, y1 - 5 - lines_above, name_lines, 13, Anchor::middle, "stream-label");
        else if (y1 < y2)
          w.text_lines(x1 + 4, y1 - 5 - lines_above, name_lines, 13, Anchor::start, "stream-label");
        else
          w.text_lines(x2 - 6, y2 - 5 - lines_above, name_lines, 13, Anchor::end, "stream-label");
        break;
      }
      case Route::bypass: {
        const std::size_t from = *info.source, to = *info.destination;
        const double lane_y = margin + 12 + lane_pitch * static_cast<double>(bypass_lane++);
        const double x1 = box_left(from) + box_width, x2 = box_left(to);
        const double y1 = port_y(from, right[from], e.stream), y2 = port_y(to, left[to], e.stream);
        draw_path(fmt::format("M{} {} L{} {} L{} {} L{} {} L{} {} L{} {}", num(x1), num(y1), num(x1 + 8), num(y1),
                              num(x1 + 8), num(lane_y), num(x2 - 8), num(lane_y), num(x2 - 8), num(y2), num(x2), num(y2)),
                  e.tear);
        w.text((x1 + x2) / 2, lane_y - 4, info.name, Anchor::middle, "stream-label");
        break;
      }
      case Route::recycle: {
        const std::size_t from = *info.source, to = *info.destination;
        const double lane_y = boxes_bottom + 6 + lane_pitch * static_cast<double>(recycle_lane++);
        const double x1 = box_left(from) + box_width, x2 = box_left(to);
        const double y1 = port_y(from, right[from], e.stream), y2 = port_y(to, left[to], e.stream);
        draw_path(fmt::format("M{} {} L{} {} L{} {} L{} {} L{} {} L{} {}", num(x1), num(y1), num(x1 + 8), num(y1),
                              num(x1 + 8), num(lane_y), num(x2 - 8), num(lane_y), num(x2 - 8), num(y2), num(x2), num(y2)),
                  true);
        w.text((x1 + x2) / 2, lane_y + 14, info.name + (e.tear ? " (tear stream)" : " (recycle)"), Anchor::middle,
               "stream-label recycle-label");
        break;
      }
    }
    w.close_group();
  }

  for (std::size_t b = 0; b < n_blocks; ++b) {
    const auto& block = c.blocks[b];
    w.open_group("block", fmt::format("data-key=\"block\" data-block=\"{}\"", svg::escape(block.name)));
    w.title(fmt::format("{} ({})", block.name, block.type));
    w.rect(box_left(b), box_top(b), box_width, box_height, "block-box", "rx=\"6\" ry=\"6\"");
    // Name in bold and type below it, both wrapped to the box width.
    const auto lines = svg::wrap_name(block.name, 12);
    const auto type_lines = svg::wrap_name(block.type, 17);
    const double cx = box_left(b) + box_width / 2;
    const double text_height = 15 * static_cast<double>(lines.size()) + 13 * static_cast<double>(type_lines.size());
    const double first = box_top(b) + (box_height - text_height) / 2 + 12;
    w.text_lines(cx, first, lines, 15, Anchor::middle, "block-name");
    w.text_lines(cx, first + 15 * static_cast<double>(lines.size()), type_lines, 13, Anchor::middle, "block-type");
    w.close_group();
  }
  return w.finish();
}

}  // namespace unchain::app
