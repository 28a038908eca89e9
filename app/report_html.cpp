#include "app/report_html.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <map>
#include <set>
#include <utility>

#include "app/exit_codes.hpp"
#include "app/svg_flow_diagram.hpp"
#include "app/svg_sankey.hpp"
#include "app/svg_writer.hpp"

namespace unchain::app {

namespace {

using svg::escape;

constexpr double J_per_kWh = 3.6e6;
constexpr double J_per_MJ = 1e6;

// The page's own style: plain, high contrast, print-friendly. No fonts or
// images are fetched.
constexpr const char* page_css = R"(
:root { --ink: #1b1b1b; --muted: #5a5a5a; --rule: #c8c8c8; --band: #f3f3f0; --accent: #1f5f8b; --warn: #8a4b00; }
* { box-sizing: border-box; }
body { margin: 0 auto; max-width: 1180px; padding: 24px 28px 48px; color: var(--ink); background: #fff;
       font: 14px/1.45 "DejaVu Sans", "Liberation Sans", Arial, sans-serif; }
header.report-head { border-bottom: 3px solid var(--accent); padding-bottom: 10px; margin-bottom: 14px; }
h1 { font-size: 24px; margin: 0 0 4px; }
h2 { font-size: 18px; margin: 28px 0 8px; padding-bottom: 3px; border-bottom: 1px solid var(--rule); color: var(--accent); }
h3 { font-size: 15px; margin: 18px 0 6px; }
p { margin: 6px 0; }
.meta, .caption, .note { color: var(--muted); font-size: 12.5px; }
nav.contents { font-size: 13px; margin: 8px 0 4px; }
nav.contents a { color: var(--accent); text-decoration: none; margin-right: 14px; white-space: nowrap; }
table { border-collapse: collapse; margin: 6px 0 10px; font-size: 12.5px; }
th, td { padding: 3px 8px; border-bottom: 1px solid var(--rule); vertical-align: top; }
th { text-align: left; background: var(--band); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
td.num { white-space: nowrap; }
tr.total td { font-weight: 700; border-top: 2px solid var(--ink); }
table.figures td:first-child { color: var(--muted); }
.open { color: #a00000; font-weight: 700; }
.closes { color: #1d6b3a; }
.wide { overflow-x: auto; }
figure { margin: 8px 0 14px; }
figure svg { max-width: 100%; height: auto; display: block; }
/* The flow diagram may use the whole window width, past the text column. */
figure.full-width { width: calc(100vw - 48px); max-width: 1800px; margin-left: calc(50% - 50vw + 24px); }
figure.full-width svg { margin: 0 auto; }
figure.full-width figcaption { max-width: 1124px; margin: 4px auto 0; }
@media print { figure.full-width { width: auto; margin-left: 0; } }
figcaption { color: var(--muted); font-size: 12.5px; margin-top: 4px; }
ul.warnings li { color: var(--warn); margin: 2px 0; }
ul.cautions li { margin: 4px 0; }
.disclaimer { border: 2px solid var(--ink); padding: 8px 12px; margin: 14px 0; font-weight: 600; }
footer { margin-top: 28px; color: var(--muted); font-size: 12px; border-top: 1px solid var(--rule); padding-top: 6px; }
svg text { font-family: "DejaVu Sans", "Liberation Sans", Arial, sans-serif; fill: #1b1b1b; }
svg .tick, svg .legend, svg .bar-value { font-size: 11px; }
svg .axis-label, svg .row-label { font-size: 12px; }
svg .row-label.strong { font-weight: 700; }
svg .axis { stroke: #333; stroke-width: 1; }
svg .grid { stroke: #e2e2e2; stroke-width: 1; }
svg .zero-line, svg .base-line { stroke: #111; stroke-width: 1.5; }
svg .marker-line { stroke: #a00000; stroke-width: 2; stroke-dasharray: 5 3; }
svg .marker-label { font-size: 11.5px; fill: #a00000; font-weight: 600; }
svg .series-line { stroke-width: 2; }
svg .block-box { fill: #f4f7fa; stroke: #1f5f8b; stroke-width: 1.6; }
svg .block-name { font-size: 14px; font-weight: 700; }
svg .block-type { font-size: 11px; fill: #5a5a5a; }
svg .flow-line { stroke: #333; stroke-width: 1.4; }
svg .flow-line.dashed { stroke: #8a4b00; stroke-dasharray: 6 4; }
svg .stream-label { font-size: 12.5px; }
svg .recycle-label { fill: #8a4b00; }
svg .sankey-label { font-size: 11.5px; }
svg .sankey-heading { font-size: 12px; font-weight: 700; }
svg .note { font-size: 13px; fill: #5a5a5a; }
@page { size: A4 landscape; margin: 12mm; }
@media print {
  body { max-width: none; padding: 0; font-size: 11px; }
  nav.contents { display: none; }
  h2 { break-after: avoid-page; }
  figure, table, .disclaimer { break-inside: avoid-page; }
  .wide { overflow: visible; }
}
)";

// A number shown rounded, with the exact value kept for scripts.
std::string keyed(const std::string& key, double value, const std::string& shown) {
  return fmt::format("<span data-key=\"{}\" data-value=\"{:.12g}\">{}</span>", escape(key), value, escape(shown));
}

std::string fixed(double v, int decimals) {
  std::string s = fmt::format("{:.{}f}", v, decimals);
  if (s.find_first_not_of("-0.") == std::string::npos && s.front() == '-') s.erase(0, 1);  // no "-0.00"
  return s;
}

// Three or four significant figures without exponent for everyday sizes.
std::string sig(double v) {
  const double a = std::abs(v);
  if (a == 0) return "0";
  if (a >= 1e7 || a < 1e-4) return fmt::format("{:.3e}", v);
  if (a >= 1000) return fixed(v, 0);
  if (a >= 100) return fixed(v, 1);
  if (a >= 10) return fixed(v, 2);
  if (a >= 1) return fixed(v, 3);
  // Three significant figures below 1: 0.100, 0.0204.
  return fixed(v, 2 - static_cast<int>(std::floor(std::log10(a))));
}

// A cost line's quantity in the unit people buy it in (kWh, h), not SI.
std::pair<double, std::string> display_quantity(double quantity, const std::string& unit) {
  if (unit == "J") return {quantity / J_per_kWh, "kWh"};
  if (unit == "s") return {quantity / 3600.0, "h"};
  return {quantity, unit};
}

std::string money(double v) { return fixed(v, 2); }

std::string td_num(const std::string& content) { return "<td class=\"num\">" + content + "</td>"; }

struct Page {
  std::string html;
  void add(const std::string& s) { html += s; }
  void section(const std::string& id, const std::string& heading) {
    html += fmt::format("<section id=\"{}\">\n<h2>{}</h2>\n", id, escape(heading));
  }
  void end_section() { html += "</section>\n"; }
  void figure(const std::string& svg_markup, const std::string& caption, const std::string& css = {}) {
    html += (css.empty() ? std::string("<figure>\n") : "<figure class=\"" + css + "\">\n") + svg_markup + "<figcaption>" + escape(caption) + "</figcaption>\n</figure>\n";
  }
  void paragraph(const std::string& text, const std::string& css = {}) {
    html += css.empty() ? "<p>" + escape(text) + "</p>\n" : "<p class=\"" + css + "\">" + escape(text) + "</p>\n";
  }
};

std::string amount_unit(const Case& c) { return c.basis == Basis::continuous ? "kg/h" : "kg"; }
std::string per_basis(const Case& c) { return c.basis == Basis::continuous ? "per hour" : "per batch"; }
// "kg per batch" or "kg/h", for headings of amounts.
std::string amount_heading(const Case& c) { return c.basis == Basis::continuous ? "kg/h" : "kg per batch"; }

void summary_section(Page& page, const ReportInputs& in) {
  const auto& r = in.costs;
  const auto& c = in.c;
  const std::string cur = c.currency;
  page.section("summary", "Key figures");
  page.add("<table class=\"figures\">\n<tr><th>figure</th><th class=\"num\">value</th><th>unit</th></tr>\n");
  const auto row = [&](const std::string& label, const std::string& value, const std::string& unit) {
    page.add("<tr><td>" + escape(label) + "</td>" + td_num(value) + "<td>" + escape(unit) + "</td></tr>\n");
  };
  const auto opt_row = [&](const std::string& label, const std::string& key, const std::optional<double>& v,
                           const std::string& unit, double factor = 1.0) {
    row(label, v ? keyed(key, *v * factor, sig(*v * factor)) : std::string("n/a"), unit);
  };
  row("polymer fed", keyed("polymer_fed_kg", r.polymer_fed_kg, sig(r.polymer_fed_kg)), amount_unit(c));
  opt_row("monomer product" + (r.monomer_component.empty() ? std::string() : " (" + r.monomer_component + ")"),
          "monomer_kg", r.monomer_kg, amount_unit(c));
  opt_row("monomer purity", "monomer_purity_percent", r.monomer_purity, "% by mass", 100.0);
  opt_row("monomer yield on polymer fed", "monomer_yield_percent", r.monomer_yield, "% by mass", 100.0);
  const double purchased_MJ = r.energy_total.purchased_J / J_per_MJ;
  row("energy purchased " + per_basis(c), keyed("energy_purchased_MJ", purchased_MJ, sig(purchased_MJ)), "MJ");
  opt_row("energy purchased per kg of monomer", "energy_per_kg_MJ", r.per_kg(purchased_MJ), "MJ/kg");
  if (r.minimum_energy)
    opt_row("thermodynamic minimum energy", "minimum_energy_MJ_per_kg",
            std::optional<double>(r.minimum_energy->per_kg_monomer_J / J_per_MJ), "MJ/kg");
  opt_row("minimum / purchased energy", "efficiency_ratio_percent", r.efficiency_ratio, "%", 100.0);
  row("net cost " + per_basis(c), keyed("net_cost", r.net_cost, money(r.net_cost)), cur);
  const auto net_per_kg = r.per_kg(r.net_cost);
  row("net cost per kg of monomer", net_per_kg ? keyed("net_cost_per_kg", *net_per_kg, money(*net_per_kg)) : "n/a",
      cur + "/kg");
  if (r.monomer_price) row("monomer value", keyed("monomer_price", *r.monomer_price, money(*r.monomer_price)), cur + "/kg");
  row("margin " + per_basis(c) + " (revenue less net cost)", keyed("margin", r.margin, money(r.margin)), cur);
  opt_row("CO2e per kg of monomer", "co2e_per_kg", r.per_kg(r.co2e_kg), "kg CO2e/kg");
  page.add("</table>\n");
  page.end_section();
}

void diagram_section(Page& page, const ReportInputs& in) {
  page.section("flow-diagram", "Block flow diagram");
  std::string caption =
      "Blocks left to right in calculation order; feeds enter from the left, products leave to the right. "
      "Dashed lines are recycles, drawn back below the blocks";
  if (!in.result.tear_streams.empty()) {
    caption += " (tear streams: ";
    for (std::size_t i = 0; i < in.result.tear_streams.size(); ++i)
      caption += (i ? ", " : "") + in.result.tear_streams[i];
    caption += ")";
  }
  caption += ".";
  // Only a diagram wider than the text column may use the whole window.
  const std::string diagram = flow_diagram_svg(in.c, in.result);
  const auto width_at = diagram.find(" width=\"");
  const double width = width_at == std::string::npos ? 0.0 : std::atof(diagram.c_str() + width_at + 8);
  page.figure(diagram, caption, width > 1124 ? "full-width" : "");
  page.end_section();
}

void sankey_section(Page& page, const ReportInputs& in) {
  page.section("mass-flows", "Mass flows (" + amount_heading(in.c) + ")");
  const SankeyData data = mass_sankey_data(in.c, in.result, in.costs);
  page.figure(sankey_svg(data, "mass-sankey", "Mass flows from feeds to products"),
              "Band widths are proportional to mass. Feeds on the left, the flowsheet in the middle, and on the right "
              "the monomer product, by-products, wastes and other outlets (vents and losses), as the case's "
              "accounting section names them. Very small flows are drawn at a minimum visible width.");
  page.end_section();
}

struct EnergyKinds {
  double electric_heating = 0, fuel = 0, other_electricity = 0, chiller = 0;
};

EnergyKinds energy_kinds(const costs::BlockEnergy& e) {
  EnergyKinds k;
  k.fuel = e.fuel_J;
  k.chiller = e.chiller_electricity_J;
  k.electric_heating = e.fuel_J > 0 ? 0.0 : std::min(e.heat_J, e.electricity_J);
  k.other_electricity = e.electricity_J - k.electric_heating;
  return k;
}

void energy_section(Page& page, const ReportInputs& in) {
  const auto& r = in.costs;
  const bool per_kg = r.per_kg(1.0).has_value();
  const double divisor = per_kg ? *r.monomer_kg : 1.0;
  const std::string unit = per_kg ? "MJ per kg of monomer" : "MJ " + per_basis(in.c);
  page.section("energy", "Energy by block and kind (" + unit + ")");

  const std::vector<std::string> kinds = {"electric heating", "fuel", "other electricity", "chiller electricity"};
  svg::StackedBarChart chart;
  chart.key = "energy-bars";
  chart.title = "Purchased energy by block and kind";
  chart.value_label = "purchased energy (" + unit + ")";
  chart.kinds = kinds;
  const auto segments = [&](const costs::BlockEnergy& e) {
    const EnergyKinds k = energy_kinds(e);
    return std::vector<svg::BarSegment>{{kinds[0], k.electric_heating / J_per_MJ / divisor},
                                        {kinds[1], k.fuel / J_per_MJ / divisor},
                                        {kinds[2], k.other_electricity / J_per_MJ / divisor},
                                        {kinds[3], k.chiller / J_per_MJ / divisor}};
  };
  for (const auto& e : r.energy_by_block) chart.rows.push_back({e.block, segments(e), false});
  chart.rows.push_back({"all blocks", segments(r.energy_total), true});
  // The legend names only the kinds this case uses.
  const auto total_segments = segments(r.energy_total);
  chart.kinds.clear();
  for (const auto& seg : total_segments)
    if (seg.value > 0) chart.kinds.push_back(seg.kind);
  if (chart.kinds.empty()) chart.kinds.push_back(kinds[0]);
  if (per_kg && r.minimum_energy)
    chart.marker = svg::BarMarker{"thermodynamic minimum", r.minimum_energy->per_kg_monomer_J / J_per_MJ};
  std::string caption =
      "Energy bought, by block: electric heating (heat drawn from an electric supply, losses included), fuel "
      "(heat drawn divided by the burner efficiency), other electricity (drives, stirrers, vacuum) and chiller "
      "electricity (cooling below the cooling-water range).";
  if (chart.marker)
    caption += " The dashed line marks the thermodynamic minimum: heating the polymer, depolymerizing it and "
               "leaving the monomer as vapour at the reaction temperature, with no losses.";
  page.figure(svg::stacked_bar_chart(chart), caption);

  // Cooling duty is energy rejected, not bought: its own chart.
  double cooling_total = 0;
  for (const auto& e : r.energy_by_block) cooling_total += e.cooling_J;
  if (cooling_total > 0) {
    svg::StackedBarChart cooling;
    cooling.key = "cooling-bars";
    cooling.title = "Heat rejected to cooling by block";
    cooling.value_label = "heat rejected to cooling (" + unit + ")";
    cooling.kinds = {"cooling duty"};
    for (const auto& e : r.energy_by_block)
      if (e.cooling_J > 0) cooling.rows.push_back({e.block, {{"cooling duty", e.cooling_J / J_per_MJ / divisor}}, false});
    cooling.rows.push_back({"all blocks", {{"cooling duty", cooling_total / J_per_MJ / divisor}}, true});
    page.figure(svg::stacked_bar_chart(cooling), "Heat removed by condensers, coolers and chillers.");
  }

  page.add(
      "<div class=\"wide\"><table>\n<tr><th>block</th><th>type</th><th class=\"num\">heat drawn (kWh)</th><th class=\"num\">electricity "
      "(kWh)</th><th class=\"num\">fuel (kWh)</th><th class=\"num\">chiller electricity (kWh)</th><th "
      "class=\"num\">cooling duty (kWh)</th><th class=\"num\">purchased (kWh)</th>");
  page.add(fmt::format("<th class=\"num\">purchased ({})</th></tr>\n", escape(unit)));
  const auto energy_row = [&](const costs::BlockEnergy& e, bool total) {
    const double purchased = e.purchased_J / J_per_MJ / divisor;
    page.add(fmt::format(
        "<tr{}><td>{}</td><td>{}</td>{}{}{}{}{}{}{}</tr>\n", total ? " class=\"total\"" : "", escape(e.block),
        escape(e.type), td_num(sig(e.heat_J / J_per_kWh)), td_num(sig(e.electricity_J / J_per_kWh)),
        td_num(sig(e.fuel_J / J_per_kWh)), td_num(sig(e.chiller_electricity_J / J_per_kWh)),
        td_num(sig(e.cooling_J / J_per_kWh)), td_num(sig(e.purchased_J / J_per_kWh)),
        td_num(total ? keyed("energy_total_purchased_per_unit", purchased, sig(purchased)) : sig(purchased))));
  };
  for (const auto& e : r.energy_by_block) energy_row(e, false);
  costs::BlockEnergy total = r.energy_total;
  total.block = "all blocks";
  total.type = "";
  energy_row(total, true);
  page.add("</table></div>\n");
  page.end_section();
}

void cost_section(Page& page, const ReportInputs& in) {
  const auto& r = in.costs;
  const std::string cur = in.c.currency;
  const bool per_kg = r.per_kg(1.0).has_value();
  page.section("costs", "Cost breakdown (" + cur + " " + per_basis(in.c) + " and " + cur + "/kg of monomer)");

  std::map<costs::CostCategory, double> by_category;
  for (const auto& line : r.lines) by_category[line.category] += line.cost;
  svg::SignedBarChart chart;
  chart.key = "cost-bars";
  chart.title = "Cost by category";
  chart.value_label = per_kg ? "cost (" + cur + " per kg of monomer; credits negative)"
                             : "cost (" + cur + " " + per_basis(in.c) + "; credits negative)";
  for (const auto& [category, cost] : by_category)
    chart.bars.push_back({costs::cost_category_name(category), per_kg ? *r.per_kg(cost) : cost});
  chart.bars.push_back({"net cost", per_kg ? *r.per_kg(r.net_cost) : r.net_cost});
  if (!r.lines.empty()) page.figure(svg::signed_bar_chart(chart), "Costs by category; credits earned by by-products count negative.");

  page.add(fmt::format(
      "<table>\n<tr><th>category</th><th>item</th><th class=\"num\">quantity</th><th>unit</th><th class=\"num\">cost "
      "({} {})</th><th class=\"num\">cost ({}/kg of monomer)</th></tr>\n",
      escape(cur), escape(per_basis(in.c)), escape(cur)));
  for (const auto& line : r.lines) {
    const auto kg = r.per_kg(line.cost);
    const auto [quantity, unit] = display_quantity(line.quantity, line.unit);
    page.add(fmt::format("<tr><td>{}</td><td>{}</td>{}<td>{}</td>{}{}</tr>\n",
                         escape(costs::cost_category_name(line.category)), escape(line.item), td_num(sig(quantity)),
                         escape(unit), td_num(money(line.cost)), td_num(kg ? money(*kg) : "n/a")));
  }
  const auto total_row = [&](const std::string& label, const std::string& key, double value) {
    const auto kg = r.per_kg(value);
    page.add(fmt::format("<tr class=\"total\"><td colspan=\"4\">{}</td>{}{}</tr>\n", escape(label),
                         td_num(keyed(key, value, money(value))),
                         td_num(kg ? keyed(key + "_per_kg", *kg, money(*kg)) : "n/a")));
  };
  total_row("total cost before credits", "total_cost", r.total_cost);
  total_row("credits", "credits", r.total_credits);
  total_row("net cost", "net_cost_total", r.net_cost);
  page.add("</table>\n");

  if (!r.capital.items.empty()) {
    page.add(fmt::format("<h3>Capital estimate ({})</h3>\n<table>\n<tr><th>block</th><th>item</th><th "
                         "class=\"num\">size</th><th>unit</th><th>method</th><th class=\"num\">purchased ({})</th><th "
                         "class=\"num\">installation factor (-)</th><th class=\"num\">installed ({})</th></tr>\n",
                         escape(cur), escape(cur), escape(cur)));
    for (const auto& item : r.capital.items)
      page.add(fmt::format("<tr><td>{}</td><td>{}</td>{}<td>{}</td><td>{}</td>{}{}{}</tr>\n", escape(item.block),
                           escape(item.item), td_num(sig(item.size)), escape(item.unit), escape(item.method),
                           td_num(money(item.purchased_cost)), td_num(fixed(item.installation_factor, 2)),
                           td_num(money(item.installed_cost))));
    page.add(fmt::format("<tr class=\"total\"><td colspan=\"5\">total (annual charge {} {}; {} {})</td>{}<td></td>{}</tr>\n",
                         money(r.capital.annual_capital_charge), escape(cur), money(r.capital.capital_charge_per_batch),
                         escape(cur + " " + per_basis(in.c)), td_num(money(r.capital.purchased_total)),
                         td_num(money(r.capital.installed_total))));
    page.add("</table>\n");
  }
  if (!r.missing_prices.empty()) {
    page.add("<p class=\"note\">Not priced (left out of the totals):</p>\n<ul>\n");
    for (const auto& m : r.missing_prices) page.add("<li>" + escape(m) + "</li>\n");
    page.add("</ul>\n");
  }
  page.end_section();
}

std::string block_name(const Case& c, const std::optional<std::size_t>& b) {
  return b ? c.blocks[*b].name : std::string();
}

void stream_section(Page& page, const ReportInputs& in) {
  const Case& c = in.c;
  const std::string unit = amount_unit(c);
  page.section("streams", "Stream table (" + amount_heading(c) + ")");
  constexpr std::size_t per_table = 6;
  for (std::size_t first = 0; first < c.streams.size(); first += per_table) {
    const std::size_t last = std::min(first + per_table, c.streams.size());
    page.add("<div class=\"wide\"><table class=\"streams\">\n<tr><th>stream</th>");
    for (std::size_t s = first; s < last; ++s) page.add("<th class=\"num\">" + escape(c.streams[s].name) + "</th>");
    page.add("</tr>\n");
    const auto text_row = [&](const std::string& label, auto cell) {
      page.add("<tr><td>" + escape(label) + "</td>");
      for (std::size_t s = first; s < last; ++s) page.add(td_num(cell(s)));
      page.add("</tr>\n");
    };
    text_row("from block", [&](std::size_t s) { return escape(c.streams[s].source ? block_name(c, c.streams[s].source) : "(feed)"); });
    text_row("to block", [&](std::size_t s) {
      return escape(c.streams[s].destination ? block_name(c, c.streams[s].destination) : "(product)");
    });
    const auto& streams = in.result.streams;
    text_row("temperature (degC)", [&](std::size_t s) { return fixed(in_kelvin(streams[s].temperature()) - 273.15, 1); });
    text_row("pressure (kPa)", [&](std::size_t s) { return sig(to_si(streams[s].pressure()) / 1000); });
    text_row("total mass (" + unit + ")", [&](std::size_t s) {
      return keyed("stream-mass-" + c.streams[s].name, to_si(streams[s].total_mass()), sig(to_si(streams[s].total_mass())));
    });
    for (const Phase p : all_phases)
      text_row(std::string(phase_name(p)) + " (" + unit + ")",
               [&](std::size_t s) { return sig(to_si(streams[s].phase_total(p))); });
    const ComponentSet& components = *c.components;
    for (std::size_t k = 0; k < components.size(); ++k) {
      bool any = false;
      for (std::size_t s = first; s < last; ++s) any = any || streams[s].component_masses()[static_cast<Eigen::Index>(k)] > 0;
      if (!any) continue;
      text_row(components[k].id + " (" + unit + ")", [&](std::size_t s) {
        const double m = streams[s].component_masses()[static_cast<Eigen::Index>(k)];
        return m > 0 ? sig(m) : std::string("-");
      });
    }
    page.add("</table></div>\n");
  }
  page.paragraph("A dash is a component absent from the stream. Phase rows split the total mass into solid, liquid "
                 "and vapour as the blocks left them.",
                 "note");
  page.end_section();
}

std::string closure_cell(const std::string& key, double error, double limit) {
  const bool ok = error <= limit;
  return fmt::format("<td class=\"num {}\"><span data-key=\"{}\" data-value=\"{:.6g}\">{:.2e}</span></td>",
                     ok ? "closes" : "open", escape(key), error, error);
}

void closure_section(Page& page, const ReportInputs& in) {
  const Case& c = in.c;
  std::set<std::string> elements;
  for (const auto& [e, _] : in.result.overall.element_relative_error) elements.insert(e);
  for (const auto& b : in.result.blocks)
    for (const auto& [e, _] : b.balance.element_relative_error) elements.insert(e);
  page.section("closure", "Balance closure (relative errors, -)");
  page.paragraph(fmt::format("Limits: mass and each element {:.0e}, energy {:.0e} (relative). Energy in and out are "
                             "enthalpies relative to the elements at 298.15 K.",
                             mass_closure_limit, energy_closure_limit),
                 "note");
  page.add(fmt::format("<div class=\"wide\"><table>\n<tr><th>balance</th><th class=\"num\">mass in ({0})</th><th "
                       "class=\"num\">mass out ({0})</th><th class=\"num\">mass error (-)</th>",
                       amount_unit(c)));
  for (const auto& e : elements) page.add("<th class=\"num\">" + escape(e) + " error (-)</th>");
  page.add("<th class=\"num\">heat and work in (MJ)</th><th class=\"num\">energy error (-)</th></tr>\n");
  const auto row = [&](const std::string& label, const std::string& key, const BalanceClosure& b, bool total) {
    page.add(fmt::format("<tr{}><td>{}</td>{}{}", total ? " class=\"total\"" : "", escape(label),
                         td_num(sig(b.mass_in_kg)), td_num(sig(b.mass_out_kg))));
    page.add(closure_cell(key + "-mass", b.mass_relative_error, mass_closure_limit));
    for (const auto& e : elements) {
      const auto it = b.element_relative_error.find(e);
      if (it == b.element_relative_error.end()) page.add(td_num("-"));
      else page.add(closure_cell(key + "-element-" + e, it->second, mass_closure_limit));
    }
    page.add(td_num(sig(b.heat_and_work_in_J / J_per_MJ)));
    page.add(closure_cell(key + "-energy", b.energy_relative_error, energy_closure_limit));
    page.add("</tr>\n");
  };
  row("whole flowsheet", "closure-overall", in.result.overall, true);
  for (const auto& b : in.result.blocks) row(b.name + " (" + b.type + ")", "closure-block-" + b.name, b.balance, false);
  page.add("</table></div>\n");
  page.end_section();
}

void solver_section(Page& page, const ReportInputs& in) {
  const auto& r = in.result;
  page.section("solver", "Calculation order and convergence");
  std::string order;
  for (std::size_t i = 0; i < r.calculation_order.size(); ++i) order += (i ? ", " : "") + r.calculation_order[i];
  page.paragraph("Calculation order: " + order + ".");
  if (r.loops.empty()) page.paragraph("No recycle loops: every block was calculated once.");
  for (const auto& loop : r.loops) {
    std::string blocks, tears;
    for (std::size_t i = 0; i < loop.blocks.size(); ++i) blocks += (i ? ", " : "") + loop.blocks[i];
    for (std::size_t i = 0; i < loop.tear_streams.size(); ++i) tears += (i ? ", " : "") + loop.tear_streams[i];
    page.paragraph(fmt::format("Recycle loop of {} torn at {}: {} after {} iterations{}.", blocks, tears,
                               loop.converged ? "converged" : "NOT converged", loop.iterations,
                               loop.residual_history.empty()
                                   ? std::string()
                                   : fmt::format(" (last scaled change {:.2e})", loop.residual_history.back())));
  }
  page.end_section();
}

void studies_section(Page& page, const ReportInputs& in) {
  const ReportStudies& s = in.studies;
  if (s.empty()) return;
  const std::string cur = in.c.currency;
  page.section("studies", "Studies");
  if (s.scale_ladder) {
    page.add("<section id=\"scale-ladder\">\n<h3>Scale ladder (per kg of monomer against scale factor)</h3>\n");
    if (!s.scale_ladder->note.empty()) page.paragraph(s.scale_ladder->note, "note");
    svg::LineChart cost{"scale-ladder-cost", "Net cost per kg of monomer against scale", "scale factor (-, log scale)",
                        "net cost (" + cur + "/kg)", true, s.scale_ladder->cost_per_kg, s.scale_ladder->base_scale,
                        "case as written"};
    svg::LineChart energy{"scale-ladder-energy", "Purchased energy per kg of monomer against scale",
                          "scale factor (-, log scale)", "energy (MJ/kg)", true, s.scale_ladder->energy_MJ_per_kg,
                          s.scale_ladder->base_scale, "case as written"};
    page.figure(svg::line_chart(cost), "Net cost per kg of monomer (" + cur + "/kg) at each scale factor.");
    page.figure(svg::line_chart(energy), "Purchased energy per kg of monomer (MJ/kg) at each scale factor.");
    page.add("</section>\n");
  }
  for (std::size_t i = 0; i < s.sensitivity.size(); ++i) {
    svg::TornadoChart chart = s.sensitivity[i].chart;
    if (chart.key.empty()) chart.key = fmt::format("tornado-{}", i + 1);
    if (chart.title.empty()) chart.title = "Sensitivity of the net cost per kg of monomer (" + cur + "/kg)";
    if (chart.value_label.empty()) chart.value_label = "net cost (" + cur + "/kg of monomer)";
    page.add(fmt::format("<section id=\"{}\">\n<h3>{}</h3>\n", escape(chart.key), escape(chart.title)));
    if (!s.sensitivity[i].note.empty()) page.paragraph(s.sensitivity[i].note, "note");
    page.figure(svg::tornado_chart(chart),
                "Each bar spans the result with one input at its low and at its high value, all others at base; "
                "the widest swing is on top.");
    page.add("</section>\n");
  }
  if (s.monte_carlo) {
    svg::Histogram h = s.monte_carlo->histogram;
    if (h.key.empty()) h.key = "monte-carlo";
    if (h.title.empty()) h.title = "Monte Carlo: net cost per kg of monomer (" + cur + "/kg)";
    if (h.value_label.empty()) h.value_label = "net cost (" + cur + "/kg of monomer)";
    page.add(fmt::format("<section id=\"monte-carlo\">\n<h3>{}</h3>\n", escape(h.title)));
    if (!s.monte_carlo->note.empty()) page.paragraph(s.monte_carlo->note, "note");
    page.figure(svg::histogram_chart(h),
                fmt::format("{} samples; P10, P50 and P90 marked (10 %, 50 % and 90 % of samples lie below them).",
                            s.monte_carlo->samples));
    page.add(fmt::format("<table><tr><th class=\"num\">P10</th><th class=\"num\">P50</th><th "
                         "class=\"num\">P90</th></tr><tr>{}{}{}</tr></table>\n",
                         td_num(keyed("monte-carlo-p10", h.p10, sig(h.p10))),
                         td_num(keyed("monte-carlo-p50", h.p50, sig(h.p50))),
                         td_num(keyed("monte-carlo-p90", h.p90, sig(h.p90)))));
    page.add("</section>\n");
  }
  page.end_section();
}

void warnings_section(Page& page, const ReportInputs& in) {
  std::vector<std::string> items = in.result.warnings;
  for (const auto& n : in.costs.notes) items.push_back(n);
  for (const auto& w : in.costs.capital.warnings) items.push_back(w);
  page.section("warnings", "Warnings");
  if (items.empty()) {
    page.paragraph("None.");
  } else {
    page.add("<ul class=\"warnings\">\n");
    for (const auto& w : items) page.add("<li>" + escape(w) + "</li>\n");
    page.add("</ul>\n");
  }
  page.end_section();
}

void safety_section(Page& page, const ReportInputs& in) {
  page.section("safety", "Safety cautions for this case");
  if (!in.cautions.from_blocks.empty()) {
    page.add("<h3>From the blocks</h3>\n<ul class=\"cautions\">\n");
    for (const auto& c : in.cautions.from_blocks) page.add("<li>" + escape(c) + "</li>\n");
    page.add("</ul>\n");
  }
  page.add("<h3>General</h3>\n<ul class=\"cautions\">\n");
  for (const auto& c : in.cautions.general) page.add("<li>" + escape(c) + "</li>\n");
  page.add("</ul>\n");
  page.add("<p class=\"disclaimer\" data-key=\"disclaimer\">" +
           escape("This report is a planning aid, not a safety assessment or a design. Its figures come from "
                  "simplified models and illustrative prices. Before building or running any equipment, defer to "
                  "local codes, permits and licensed professionals.") +
           "</p>\n");
  page.end_section();
}

}  // namespace

std::string report_html(const ReportInputs& in) {
  const Case& c = in.c;
  const std::string title = c.title.empty() ? c.file : c.title;
  Page page;
  page.add("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n");
  page.add("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n");
  page.add("<meta name=\"generator\" content=\"" + escape(in.program_version) + "\"/>\n");
  page.add("<title>" + escape(title) + " - unchain report</title>\n<style>" + std::string(page_css) + "</style>\n</head>\n<body>\n");
  page.add("<header class=\"report-head\">\n<h1 data-key=\"case-title\">" + escape(title) + "</h1>\n");
  if (!c.description.empty()) page.paragraph(c.description);
  page.paragraph(fmt::format("Case file {}; basis: {} ({}); currency {}; ambient {:.1f} degC. {}.", c.file,
                             basis_name(c.basis), amount_heading(c), c.currency,
                             in_kelvin(c.ambient_temperature) - 273.15,
                             in.result.converged ? "Solved and converged" : "NOT converged"),
                 "meta");
  page.add("<nav class=\"contents\"><a href=\"#summary\">key figures</a><a href=\"#flow-diagram\">flow diagram</a>"
           "<a href=\"#mass-flows\">mass flows</a><a href=\"#energy\">energy</a><a href=\"#costs\">costs</a>"
           "<a href=\"#streams\">streams</a><a href=\"#closure\">closure</a>");
  if (!in.studies.empty()) page.add("<a href=\"#studies\">studies</a>");
  page.add("<a href=\"#warnings\">warnings</a><a href=\"#safety\">safety</a></nav>\n</header>\n<main>\n");

  summary_section(page, in);
  diagram_section(page, in);
  sankey_section(page, in);
  energy_section(page, in);
  cost_section(page, in);
  stream_section(page, in);
  closure_section(page, in);
  solver_section(page, in);
  studies_section(page, in);
  warnings_section(page, in);
  safety_section(page, in);

  page.add("</main>\n<footer>Written by " + escape(in.program_version) +
           ". Figures per batch for a batch case, per hour for a continuous one; per kg of monomer where the "
           "monomer product is known. The prices and yields of demo cases are illustrative.</footer>\n");
  page.add("</body>\n</html>\n");
  return page.html;
}

}  // namespace unchain::app
