// The SVG building blocks and charts of the HTML report (app/svg_*.hpp).
#include <doctest/doctest.h>

#include <cmath>
#include <map>
#include <regex>
#include <string>
#include <vector>

#include "app/command_check.hpp"
#include "app/svg_charts.hpp"
#include "app/svg_flow_diagram.hpp"
#include "app/svg_writer.hpp"

namespace svg = unchain::app::svg;

namespace {

struct DrawnBar {
  double x = 0, width = 0, value = 0;
};

// The rectangles of a chart that carry a data-value, in drawing order.
std::vector<DrawnBar> bars_in(const std::string& markup) {
  std::vector<DrawnBar> bars;
  const std::regex rect(R"re(<rect x="([-0-9.]+)" y="[-0-9.]+" width="([0-9.]+)" height="[0-9.]+"[^>]*data-value="([-0-9.e+]+)")re");
  for (auto it = std::sregex_iterator(markup.begin(), markup.end(), rect); it != std::sregex_iterator(); ++it)
    bars.push_back({std::stod((*it)[1]), std::stod((*it)[2]), std::stod((*it)[3])});
  return bars;
}

}  // namespace

TEST_CASE("svg escape makes any text safe for XML") {
  // Source: W3C XML 1.0 (Fifth Edition), section 2.4 (& and < must be
  // escaped; > and quotes in attributes) and section 2.2 (characters
  // below 0x20 other than tab, LF and CR are not allowed at all).
  CHECK(svg::escape("a<b & \"c\" 'd'>") == "a&lt;b &amp; &quot;c&quot; &#39;d&#39;&gt;");
  CHECK(svg::escape(std::string("bell\x07here")) == "bellhere");
  CHECK(svg::escape("tab\there") == "tab\there");
  CHECK(svg::escape("plain_name 12 degC") == "plain_name 12 degC");
  CHECK(svg::escape("&amp;") == "&amp;amp;");  // escaping twice is visible, not swallowed
}

TEST_CASE("svg nice ticks step by 1, 2 or 5 times a power of ten") {
  // common practice: axis ticks at 1-2-5 multiples of a power of ten.
  CHECK(svg::nice_step(3.25) == doctest::Approx(5.0));
  CHECK(svg::nice_step(0.148) == doctest::Approx(0.2));
  CHECK(svg::nice_step(0.2) == doctest::Approx(0.2));
  CHECK(svg::nice_step(1.01) == doctest::Approx(2.0));
  CHECK(svg::nice_step(700) == doctest::Approx(1000.0));

  const auto t = svg::nice_ticks(0, 19.5, 6);
  REQUIRE(t.values.size() == 5);
  CHECK(t.values.front() == 0.0);
  CHECK(t.values.back() == doctest::Approx(20.0));
  CHECK(t.step == doctest::Approx(5.0));

  const auto fractions = svg::nice_ticks(0.13, 0.87, 5);
  CHECK(fractions.first == doctest::Approx(0.0));
  CHECK(fractions.last == doctest::Approx(1.0));
  CHECK(fractions.values.size() == 6);

  const auto signed_range = svg::nice_ticks(-0.22, 217, 6);
  CHECK(signed_range.first == doctest::Approx(-50.0));
  CHECK(signed_range.last == doctest::Approx(250.0));
  CHECK(signed_range.values[1] == 0.0);  // zero is a tick, exactly

  const auto flat = svg::nice_ticks(3, 3, 5);  // a single value still gets an axis around it
  CHECK(flat.first < 3.0);
  CHECK(flat.last > 3.0);
}

TEST_CASE("svg log ticks are decades, with 2 and 5 over short ranges") {
  // common practice: logarithmic axes labelled at decades.
  const auto wide = svg::log_ticks(0.1, 1000);
  REQUIRE(wide.size() == 5);
  CHECK(wide[0] == doctest::Approx(0.1));
  CHECK(wide[4] == doctest::Approx(1000.0));
  const auto narrow = svg::log_ticks(1, 10);
  REQUIRE(narrow.size() == 4);
  CHECK(narrow[1] == doctest::Approx(2.0));
  CHECK(narrow[2] == doctest::Approx(5.0));
  CHECK(svg::log_ticks(-1, 10).empty());

  const svg::LogScale s{1, 100, 0, 200};
  CHECK(s(10) == doctest::Approx(100.0));  // a decade is the same length everywhere
  CHECK(s(1) == doctest::Approx(0.0));
  CHECK(svg::tick_label(0.5) == "0.5");
  CHECK(svg::tick_label(20) == "20");
  CHECK(svg::tick_label(-0.0) == "0");
}

TEST_CASE("svg names wrap after underscores") {
  CHECK(svg::wrap_name("acetone_to_dissolver", 13) == std::vector<std::string>{"acetone_to_", "dissolver"});
  CHECK(svg::wrap_name("gel", 13) == std::vector<std::string>{"gel"});
  CHECK(svg::wrap_name("averyveryverylongname", 5) == std::vector<std::string>{"averyveryverylongname"});
}

TEST_CASE("svg stacked bar lengths are proportional to their values") {
  svg::StackedBarChart chart;
  chart.key = "test-bars";
  chart.title = "a <test> & more";
  chart.value_label = "energy (MJ/kg)";
  chart.kinds = {"heat", "electricity"};
  chart.rows = {{"a", {{"heat", 1.0}}, false}, {"b", {{"heat", 2.0}, {"electricity", 0.5}}, false},
                {"c", {{"heat", 4.0}}, true}};
  chart.marker = svg::BarMarker{"minimum", 1.5};
  const std::string markup = svg::stacked_bar_chart(chart);
  CHECK(markup.find("a &lt;test&gt; &amp; more") != std::string::npos);
  CHECK(markup.find("data-key=\"test-bars\"") != std::string::npos);

  const auto bars = bars_in(markup);
  REQUIRE(bars.size() == 4);
  const double px_per_unit = bars[0].width / bars[0].value;
  CHECK(px_per_unit > 0);
  for (const auto& b : bars) CHECK(b.width == doctest::Approx(b.value * px_per_unit).epsilon(0.002));
  // The electricity segment of row b starts where its heat segment ends.
  CHECK(bars[2].x == doctest::Approx(bars[1].x + bars[1].width).epsilon(0.002));

  const std::regex marker(R"re(<line x1="([0-9.]+)"[^>]*data-key="marker" data-value="1.5")re");
  std::smatch m;
  REQUIRE(std::regex_search(markup, m, marker));
  CHECK(std::stod(m[1]) == doctest::Approx(bars[0].x + 1.5 * px_per_unit).epsilon(0.002));
}

TEST_CASE("svg tornado bars run from the base to each result") {
  svg::TornadoChart chart{"tornado", "cost", "net cost (USD/kg)", 10.0,
                          {{"small", 9.0, 11.0, "low", "high"}, {"large", 6.0, 18.0, "0.5", "2"}}};
  const std::string markup = svg::tornado_chart(chart);
  struct Bar {
    double x = 0, width = 0, y = 0;
  };
  std::map<std::string, Bar> bars;  // "row/low" and "row/high"
  const std::regex rect(
      R"re(<rect x="([-0-9.]+)" y="([-0-9.]+)" width="([0-9.]+)" height="[0-9.]+" class="(low|high)"[^>]*data-row="([a-z]+)")re");
  for (auto it = std::sregex_iterator(markup.begin(), markup.end(), rect); it != std::sregex_iterator(); ++it)
    bars[(*it)[5].str() + "/" + (*it)[4].str()] = {std::stod((*it)[1]), std::stod((*it)[3]), std::stod((*it)[2])};
  REQUIRE(bars.size() == 4);
  const double px = bars["large/high"].width / 8.0;  // 18 - 10
  CHECK(bars["large/low"].width == doctest::Approx(4.0 * px).epsilon(0.002));
  CHECK(bars["small/low"].width == doctest::Approx(1.0 * px).epsilon(0.002));
  CHECK(bars["small/high"].width == doctest::Approx(1.0 * px).epsilon(0.002));
  // Low results left of the base, high ones right of it, meeting at the base line.
  CHECK(bars["large/low"].x + bars["large/low"].width == doctest::Approx(bars["large/high"].x).epsilon(0.002));
  CHECK(bars["small/high"].x == doctest::Approx(bars["large/high"].x).epsilon(0.002));
  // The widest swing is drawn on top.
  CHECK(bars["large/low"].y < bars["small/low"].y);
}

TEST_CASE("svg histogram bin heights follow the counts and the percentiles are marked") {
  svg::Histogram h{"mc", "Monte Carlo", "net cost (USD/kg)", {0, 1, 2, 3}, {5, 10, 20}, 0.8, 1.9, 2.7};
  const std::string markup = svg::histogram_chart(h);
  const std::regex bin(R"re(height="([0-9.]+)" class="bin"[^>]*data-count="([0-9.]+)")re");
  std::vector<std::pair<double, double>> bins;
  for (auto it = std::sregex_iterator(markup.begin(), markup.end(), bin); it != std::sregex_iterator(); ++it)
    bins.emplace_back(std::stod((*it)[1]), std::stod((*it)[2]));
  REQUIRE(bins.size() == 3);
  for (const auto& [height, count] : bins) CHECK(height / count == doctest::Approx(bins[0].first / 5.0).epsilon(0.01));
  for (const char* p : {"data-key=\"P10\" data-value=\"0.8\"", "data-key=\"P50\" data-value=\"1.9\"",
                        "data-key=\"P90\" data-value=\"2.7\""})
    CHECK(markup.find(p) != std::string::npos);
}

TEST_CASE("svg line chart on a log axis spaces decades equally") {
  svg::LineChart chart{"ladder", "cost", "scale factor (-)", "cost (USD/kg)", true,
                       {{1, 30}, {10, 20}, {100, 10}, {0, 99}}, 1.0, "base"};
  const std::string markup = svg::line_chart(chart);
  const std::regex point(R"re(<circle cx="([0-9.]+)" cy="([0-9.]+)"[^>]*data-x="([0-9.e+]+)")re");
  std::vector<double> xs;
  for (auto it = std::sregex_iterator(markup.begin(), markup.end(), point); it != std::sregex_iterator(); ++it)
    xs.push_back(std::stod((*it)[1]));
  REQUIRE(xs.size() == 3);  // the point at x = 0 has no place on a log axis
  CHECK(xs[1] - xs[0] == doctest::Approx(xs[2] - xs[1]).epsilon(0.002));
}

TEST_CASE("flow diagram places blocks by calculation order with the recycle drawn back") {
  // The shipped acetone case: mixer -> dissolver -> dryer, the dryer's
  // recovered acetone torn and returned to the mixer, then the pyrolysis train.
  const auto c = unchain::app::load_case_for_command(
      std::string(UNCHAIN_SOURCE_DIR) + "/cases/lab_acetone_densification.yaml", {});
  unchain::SolveResult result;  // only the order and the tears matter for the layout
  result.calculation_order = {"acetone_mixer", "dissolver", "dryer", "reactor", "oil_condenser", "oil_wash", "still"};
  result.tear_streams = {"recovered_acetone"};
  const auto placement = unchain::app::place_blocks(c, result);
  for (std::size_t i = 0; i < result.calculation_order.size(); ++i) {
    const auto b = c.block_index(result.calculation_order[i]);
    REQUIRE(b.has_value());
    CHECK(placement[*b].column == i);
    CHECK(placement[*b].row == 0);
  }
  const std::string markup = unchain::app::flow_diagram_svg(c, result);
  CHECK(markup.find("class=\"stream recycle\" data-key=\"stream\" data-stream=\"recovered_acetone\"") != std::string::npos);
  CHECK(markup.find("data-stream=\"gel\"") != std::string::npos);
  CHECK(markup.find("data-block=\"still\"") != std::string::npos);
}
