#include "app/svg_sankey.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "app/svg_writer.hpp"
#include "costs/accounting.hpp"

namespace unchain::app {

namespace {

using svg::Anchor;
using svg::num;

constexpr const char* input_colours[] = {"#1f5f8b", "#7fb8dc", "#3f9b6e", "#9a9a9a"};
constexpr const char* output_colours[] = {"#1f5f8b", "#e3a33b", "#b5547c", "#9a9a9a"};

bool contains(const std::vector<std::string>& list, const std::string& name) {
  return std::find(list.begin(), list.end(), name) != list.end();
}

std::size_t group_index(const std::vector<std::string>& groups, const std::string& group) {
  return static_cast<std::size_t>(std::find(groups.begin(), groups.end(), group) - groups.begin());
}

// Masses to four significant figures (or 0.1 kg above 1000 kg).
std::string mass_text(double kg, const std::string& unit) {
  const double a = std::abs(kg);
  if (a == 0) return "0 " + unit;
  if (a >= 1000) return fmt::format("{:.1f} {}", kg, unit);
  if (a < 1e-6) return fmt::format("{:.3e} {}", kg, unit);
  const int decimals = std::max(0, 3 - static_cast<int>(std::floor(std::log10(a))));
  return fmt::format("{:.{}f} {}", kg, decimals, unit);
}

}  // namespace

SankeyData mass_sankey_data(const Case& c, const SolveResult& result, const costs::CostReport& report) {
  SankeyData data;
  data.unit = c.basis == Basis::continuous ? "kg/h" : "kg";
  data.input_groups = {"polymer feed", "solvent make-up", "process water", "other feed"};
  data.output_groups = {"monomer product", "by-product", "waste", "other outlet"};
  // The accounting section was read once already by the cost evaluation;
  // any error in it has been thrown there, so diagnostics are ignored here.
  DiagnosticList diagnostics;
  const costs::Accounting accounting = costs::read_accounting(c, diagnostics);
  std::vector<std::string> byproducts, wastes;
  for (const auto& b : accounting.byproducts) byproducts.push_back(b.stream);
  for (const auto& w : report.wastes) wastes.push_back(w.stream);

  for (std::size_t s = 0; s < c.streams.size() && s < result.streams.size(); ++s) {
    const StreamInfo& info = c.streams[s];
    if (!result.streams[s].has_components()) continue;
    const double kg = to_si(result.streams[s].total_mass());
    if (!info.source && info.destination) {
      std::string group = "other feed";
      if (contains(accounting.polymer_feeds, info.name)) group = "polymer feed";
      else if (contains(accounting.solvent_makeup_feeds, info.name)) group = "solvent make-up";
      else if (contains(accounting.water_feeds, info.name)) group = "process water";
      data.inputs.push_back({info.name, group, kg});
    } else if (info.source && !info.destination) {
      std::string group = "other outlet";
      if (accounting.monomer_stream && *accounting.monomer_stream == info.name) group = "monomer product";
      else if (contains(byproducts, info.name)) group = "by-product";
      else if (contains(wastes, info.name)) group = "waste";
      data.outputs.push_back({info.name, group, kg});
    }
  }
  const auto by_group = [](const std::vector<std::string>& groups) {
    return [&groups](const SankeyFlow& a, const SankeyFlow& b) {
      return group_index(groups, a.group) < group_index(groups, b.group);
    };
  };
  std::stable_sort(data.inputs.begin(), data.inputs.end(), by_group(data.input_groups));
  std::stable_sort(data.outputs.begin(), data.outputs.end(), by_group(data.output_groups));
  return data;
}

std::string sankey_svg(const SankeyData& data, const std::string& key, const std::string& title) {
  constexpr double width = 860, node_width = 16, left_x = 230, right_x = width - 250;
  constexpr double middle_x = (left_x + right_x) / 2 - node_width / 2;
  constexpr double top = 40, flow_height = 340;  // pixels for the larger side's total mass
  constexpr double min_node = 1.5, min_spacing = 17, group_gap = 8;

  double in_total = 0, out_total = 0;
  for (const auto& f : data.inputs) in_total += std::max(f.kg, 0.0);
  for (const auto& f : data.outputs) out_total += std::max(f.kg, 0.0);
  const double total = std::max({in_total, out_total, 1e-30});
  const double scale = flow_height / total;  // pixels per kg

  // Node positions: stacked from the top, each given room for its label.
  struct Node {
    double y = 0, h = 0;
  };
  const auto stack = [&](const std::vector<SankeyFlow>& flows) {
    std::vector<Node> nodes;
    double y = top;
    for (std::size_t i = 0; i < flows.size(); ++i) {
      if (i > 0 && flows[i].group != flows[i - 1].group) y += group_gap;
      const double h = std::max(std::max(flows[i].kg, 0.0) * scale, min_node);
      nodes.push_back({y, h});
      y += std::max(h, min_spacing) + 4;
    }
    return nodes;
  };
  const auto in_nodes = stack(data.inputs), out_nodes = stack(data.outputs);
  const auto column_bottom = [&](const std::vector<Node>& nodes) {
    return nodes.empty() ? top : nodes.back().y + std::max(nodes.back().h, min_spacing);
  };
  const double content_bottom = std::max({column_bottom(in_nodes), column_bottom(out_nodes), top + flow_height});
  const double middle_h = std::max(total * scale, min_node);
  const double middle_y = top + (content_bottom - top - middle_h) / 2;
  const double height = content_bottom + 64;

  svg::Writer w(width, height, key, title);
  w.text(left_x + node_width, 20, fmt::format("in: {}", mass_text(in_total, data.unit)), Anchor::end, "sankey-heading",
         fmt::format("data-key=\"sankey-in\" data-value=\"{:.12g}\"", in_total));
  w.text(right_x, 20, fmt::format("out: {}", mass_text(out_total, data.unit)), Anchor::start, "sankey-heading",
         fmt::format("data-key=\"sankey-out\" data-value=\"{:.12g}\"", out_total));


  // Bands into the middle node, stacked in its height in input order.
  const auto draw_side = [&](const std::vector<SankeyFlow>& flows, const std::vector<Node>& nodes,
                             const std::vector<std::string>& groups, const char* const* colours, bool inputs) {
    double at = middle_y;
    for (std::size_t i = 0; i < flows.size(); ++i) {
      const SankeyFlow& f = flows[i];
      const double band = std::max(f.kg, 0.0) * scale;
      const char* fill = colours[std::min<std::size_t>(group_index(groups, f.group), 3)];
      const double node_x = inputs ? left_x : right_x;
      w.open_group("sankey-flow", fmt::format("data-key=\"sankey-flow\" data-stream=\"{}\" data-group=\"{}\" data-kg=\"{:.12g}\"",
                                              svg::escape(f.name), svg::escape(f.group), f.kg));
      w.title(fmt::format("{} ({}): {}", f.name, f.group, mass_text(f.kg, data.unit)));
      if (band > 0) {
        const double x0 = inputs ? left_x + node_width : middle_x + node_width;
        const double x1 = inputs ? middle_x : right_x;
        const double y0 = inputs ? nodes[i].y : at, y1 = inputs ? at : nodes[i].y;
        const double xm = (x0 + x1) / 2;
        const std::string d = fmt::format(
            "M{} {} C{} {} {} {} {} {} L{} {} C{} {} {} {} {} {} Z", num(x0), num(y0), num(xm), num(y0), num(xm),
            num(y1), num(x1), num(y1), num(x1), num(y1 + band), num(xm), num(y1 + band), num(xm), num(y0 + band),
            num(x0), num(y0 + band));
        w.path(d, "sankey-band", fmt::format("fill=\"{}\" fill-opacity=\"0.45\"", fill));
      }
      w.rect(node_x, nodes[i].y, node_width, nodes[i].h, "sankey-node", fmt::format("fill=\"{}\"", fill));
      const double label_y = nodes[i].y + std::max(nodes[i].h, 10.0) / 2 + 4;
      const std::string label = fmt::format("{}  {}", f.name, mass_text(f.kg, data.unit));
      if (inputs) w.text(node_x - 6, label_y, label, Anchor::end, "sankey-label");
      else w.text(node_x + node_width + 6, label_y, label, Anchor::start, "sankey-label");
      w.close_group();
      at += band;
    }
  };
  draw_side(data.inputs, in_nodes, data.input_groups, input_colours, true);
  draw_side(data.outputs, out_nodes, data.output_groups, output_colours, false);
  w.rect(middle_x, middle_y, node_width, middle_h, "sankey-node", "fill=\"#444\"");
  w.text(middle_x + node_width / 2, middle_y - 8, "flowsheet", Anchor::middle, "sankey-heading");

  // Legend of the groups actually present.
  double lx = 20;
  const double ly = height - 22;
  const auto legend = [&](const std::vector<SankeyFlow>& flows, const std::vector<std::string>& groups,
                          const char* const* colours) {
    for (std::size_t g = 0; g < groups.size(); ++g) {
      const bool present = std::any_of(flows.begin(), flows.end(), [&](const SankeyFlow& f) { return f.group == groups[g]; });
      if (!present) continue;
      w.rect(lx, ly - 10, 12, 12, "swatch", fmt::format("fill=\"{}\"", colours[std::min<std::size_t>(g, 3)]));
      w.text(lx + 16, ly, groups[g], Anchor::start, "legend");
      lx += 34 + 7.0 * static_cast<double>(groups[g].size());
    }
  };
  legend(data.inputs, data.input_groups, input_colours);
  legend(data.outputs, data.output_groups, output_colours);
  return w.finish();
}

}  // namespace unchain::app
