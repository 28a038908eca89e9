// Monte Carlo uncertainty: distributions against their closed forms,
// streamed quantiles within their stated error, the sampled mean of a linear
// output against its analytic mean, reproducibility across thread counts,
// and the errors of a bad `uncertainty` section.

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "costs/monte_carlo.hpp"

using namespace unchain;
using namespace unchain::costs;

namespace {

const std::string heat_case = std::string(UNCHAIN_SOURCE_DIR) + "/tests/cli/study_heat.yaml";
const std::string shared_prices_case = std::string(UNCHAIN_SOURCE_DIR) + "/tests/cli/study_heat_shared_prices.yaml";

// The warm-monomer case with the given uncertainty section, in a temporary file.
std::string case_with_uncertainty(const std::string& name, const std::string& section) {
  std::ifstream in(heat_case);
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  text = text.substr(0, text.find("uncertainty:"));
  const auto path = std::filesystem::temp_directory_path() / ("unchain_test_mc_" + name + ".yaml");
  std::ofstream(path) << text << section;
  return path.string();
}

// Lines of the case before its uncertainty section (where the fixtures start).
int lines_before_section() {
  std::ifstream in(heat_case);
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  text = text.substr(0, text.find("uncertainty:"));
  return static_cast<int>(std::count(text.begin(), text.end(), '\n'));
}

std::string input_error_text(const std::string& path) {
  try {
    const PreparedCase prepared(path);
    (void)read_uncertainty_settings(prepared);
  } catch (const InputError& e) {
    std::string all;
    for (const auto& d : e.diagnostics()) all += d.to_string() + "\n";
    return all;
  }
  return "no error";
}

double standard_normal_density(double z) { return std::exp(-0.5 * z * z) / std::sqrt(2 * M_PI); }

}  // namespace

TEST_CASE("distributions: quantiles, means and spreads match the closed forms") {
  // Source: standard normal quantile z(0.9) = 1.2815515655446004 (scipy.stats.norm.ppf(0.9)).
  const auto n = Distribution::normal(500, 10);
  CHECK(n.quantile(0.9) == doctest::Approx(500 + 10 * 1.2815515655446004).epsilon(1e-12));
  CHECK(n.quantile(0.5) == doctest::Approx(500).epsilon(1e-14));
  CHECK(n.mean() == 500);
  CHECK(n.standard_deviation() == 10);
  // Triangular(0, 1, 4): F(mode) = 1/4; x_p = sqrt(4 p) below it, 4 - sqrt(12 (1 - p)) above
  // (closed form of the triangular inverse CDF).
  const auto t = Distribution::triangular(0, 1, 4);
  CHECK(t.quantile(0.1) == doctest::Approx(std::sqrt(0.4)).epsilon(1e-12));
  CHECK(t.quantile(0.9) == doctest::Approx(4 - std::sqrt(1.2)).epsilon(1e-12));
  CHECK(t.mean() == doctest::Approx(5.0 / 3.0).epsilon(1e-14));
  // Variance (a^2 + b^2 + c^2 - ab - ac - bc) / 18 = (0 + 1 + 16 - 0 - 0 - 4) / 18.
  CHECK(t.standard_deviation() == doctest::Approx(std::sqrt(13.0 / 18.0)).epsilon(1e-14));
  const auto u = Distribution::uniform(20, 40);
  CHECK(u.quantile(0.25) == doctest::Approx(25));
  CHECK(u.standard_deviation() == doctest::Approx(20 / std::sqrt(12.0)));
  // Lognormal from mean 10, sd 5: sigma^2 = ln 1.25, median = 10 / sqrt(1.25) (closed form).
  const auto ln = Distribution::lognormal_from_mean(10, 5);
  CHECK(ln.mean() == doctest::Approx(10).epsilon(1e-12));
  CHECK(ln.standard_deviation() == doctest::Approx(5).epsilon(1e-12));
  CHECK(ln.median() == doctest::Approx(10 / std::sqrt(1.25)).epsilon(1e-12));
  // Source: scipy.stats.lognorm(s=0.5, scale=2).ppf(0.1) = 1.0546640...: 2 exp(-0.5 z(0.9)).
  const auto lm = Distribution::lognormal_from_median(2, 0.5);
  CHECK(lm.quantile(0.1) == doctest::Approx(2 * std::exp(-0.5 * 1.2815515655446004)).epsilon(1e-12));
  CHECK(lm.cdf(2) == doctest::Approx(0.5).epsilon(1e-12));
}

TEST_CASE("distributions: impossible parameters are refused with the reason") {
  CHECK_THROWS_WITH_AS(Distribution::uniform(2, 1), doctest::Contains("low must be below high"), std::invalid_argument);
  CHECK_THROWS_WITH_AS(Distribution::triangular(0, 5, 4), doctest::Contains("mode must lie between"),
                       std::invalid_argument);
  CHECK_THROWS_WITH_AS(Distribution::normal(1, -1), doctest::Contains("standard_deviation must be positive"),
                       std::invalid_argument);
  CHECK_THROWS_AS(Distribution::lognormal_from_median(-1, 0.2), std::invalid_argument);
  CHECK_THROWS_AS(Distribution::lognormal_from_mean(1, 0), std::invalid_argument);
}

TEST_CASE("sample generator: a sample's numbers depend only on seed and index") {
  SampleGenerator a(42, 7), b(42, 7), c(42, 8), d(43, 7);
  const double first = a.next_open_unit();
  CHECK(first == b.next_open_unit());
  CHECK(first != c.next_open_unit());
  CHECK(first != d.next_open_unit());
  // Uniformity: the mean of 100000 numbers is within 4 sigma of 1/2 (sigma = 1/sqrt(12 n)).
  SampleGenerator g(1, 0);
  double sum = 0;
  int outside = 0;
  const int n = 100000;
  for (int i = 0; i < n; ++i) {
    const double x = g.next_open_unit();
    if (!(x > 0.0 && x < 1.0)) ++outside;
    sum += x;
  }
  CHECK(outside == 0);
  CHECK(std::abs(sum / n - 0.5) < 4 / std::sqrt(12.0 * n));
}

TEST_CASE("streamed quantiles of a known distribution lie within their stated error") {
  // 200000 draws of N(0, 1) by inverse CDF. The estimate is within one bin
  // (resolution()) of the empirical quantile, which itself is within
  // 4 sqrt(p (1 - p) / n) / phi(z_p) of the true quantile with
  // probability > 0.9999 (asymptotic normality of sample quantiles).
  // Source: z(0.1) = -1.2815515655446004, z(0.5) = 0 (scipy.stats.norm.ppf).
  const auto normal = Distribution::normal(0, 1);
  StreamingHistogram h;
  const std::size_t n = 200000;
  for (std::size_t i = 0; i < n; ++i) {
    SampleGenerator g(99, i);
    h.add(normal.quantile(g.next_open_unit()));
  }
  CHECK(h.count() == n);
  CHECK(h.resolution() > 0);
  CHECK(h.resolution() < 0.01);
  for (const auto& [p, z] : std::vector<std::pair<double, double>>{{0.1, -1.2815515655446004},
                                                                    {0.5, 0.0},
                                                                    {0.9, 1.2815515655446004}}) {
    const double sampling = 4 * std::sqrt(p * (1 - p) / n) / standard_normal_density(z);
    CHECK(std::abs(h.quantile(p) - z) < sampling + h.resolution());
  }
  // The display histogram keeps every value.
  std::size_t total = 0;
  for (const auto& b : h.display(40)) total += b.count;
  CHECK(total == n);
  CHECK(h.display(40).size() <= 40);
}

TEST_CASE("streamed quantiles: exact for few values, bins that grow keep every count") {
  StreamingHistogram small;
  for (double x : {5.0, 1.0, 3.0, 2.0, 4.0}) small.add(x);
  CHECK(small.quantile(0.5) == 3.0);  // order statistic of rank ceil(0.5 x 5) = 3
  CHECK(small.quantile(0.1) == 1.0);
  CHECK(small.quantile(1.0) == 5.0);
  CHECK(small.resolution() == 0.0);
  // A range that must double many times: values 0..9999 then 1e6.
  StreamingHistogram grow(64, 16);
  for (int i = 0; i < 10000; ++i) grow.add(i);
  grow.add(1e6);
  std::size_t total = 0;
  for (const auto& b : grow.display(10)) total += b.count;
  CHECK(total == 10001);
  CHECK(std::abs(grow.quantile(0.5) - 5000) <= grow.resolution());
}

TEST_CASE("monte carlo: the mean of a linear output matches its analytic mean") {
  // Net cost per batch = other costs + 0.5 h x labour rate; rate ~ U(20, 40) USD/h.
  // Analytic: mean = cost at 30 USD/h, sd = 0.5 x 20 / sqrt(12) = 2.8868 USD.
  // Bound: |mean - analytic| < 4 sd / sqrt(n) (4 sigma of the sample mean).
  const auto path = case_with_uncertainty("linear", R"(uncertainty:
  samples: 400
  seed: 11
  parameters:
    - {path: prices.labour_rate, distribution: uniform, low: "20 USD/h", high: "40 USD/h"}
)");
  const PreparedCase prepared(path);
  const auto settings = read_uncertainty_settings(prepared);
  CHECK(settings.samples == 400);
  CHECK(settings.seed == 11);
  const auto result = run_monte_carlo(prepared, settings, {});
  const double at_mean = prepared.evaluate({{"prices.labour_rate", "30 USD/h"}}).value("net_cost_per_basis").value();
  const OutputStatistics* s = result.find("net_cost_per_basis");
  REQUIRE(s != nullptr);
  CHECK(s->count == 400);
  const double sd = 0.5 * 20 / std::sqrt(12.0);
  CHECK(std::abs(s->mean - at_mean) < 4 * sd / std::sqrt(400.0));
  // The sample sd has a standard error of about sd / sqrt(2 n); 4 of those.
  CHECK(std::abs(s->standard_deviation - sd) < 4 * sd / std::sqrt(800.0));
  // Bounds of the output follow from the bounds of the rate.
  CHECK(s->minimum >= at_mean - 5.0 - 1e-9);
  CHECK(s->maximum <= at_mean + 5.0 + 1e-9);
  CHECK(result.failed == 0);
  CHECK(result.base.value("net_cost_per_basis").value() == doctest::Approx(at_mean).epsilon(1e-12));
}

TEST_CASE("monte carlo: the same seed gives identical results on 1 and 2 threads") {
  const PreparedCase prepared(heat_case);
  const auto settings = read_uncertainty_settings(prepared);
  REQUIRE(settings.parameters.size() == 3);
  std::vector<std::vector<double>> rows_1, rows_2;
  MonteCarloOptions one;
  one.threads = 1;
  one.samples = 300;
  one.on_sample = [&](const SampleRecord& s) { rows_1.push_back(s.inputs); };
  MonteCarloOptions two = one;
  two.threads = 2;
  two.on_sample = [&](const SampleRecord& s) { rows_2.push_back(s.inputs); };
  const auto a = run_monte_carlo(prepared, settings, one);
  const auto b = run_monte_carlo(prepared, settings, two);
  CHECK(a.threads == 1);
  CHECK(b.threads == 2);
  CHECK(rows_1 == rows_2);
  REQUIRE(a.outputs.size() == b.outputs.size());
  for (std::size_t k = 0; k < a.outputs.size(); ++k) {
    CHECK(a.outputs[k].mean == b.outputs[k].mean);
    CHECK(a.outputs[k].standard_deviation == b.outputs[k].standard_deviation);
    CHECK(a.outputs[k].p10 == b.outputs[k].p10);
    CHECK(a.outputs[k].p50 == b.outputs[k].p50);
    CHECK(a.outputs[k].p90 == b.outputs[k].p90);
  }
  // Another seed draws other values.
  MonteCarloOptions other = one;
  other.seed = 8;
  other.on_sample = {};
  const auto c = run_monte_carlo(prepared, settings, other);
  CHECK(c.find("net_cost_per_basis")->mean != a.find("net_cost_per_basis")->mean);
}

TEST_CASE("monte carlo: a price from the shared price file can be sampled") {
  const PreparedCase prepared(shared_prices_case);
  const auto settings = read_uncertainty_settings(prepared);
  const auto result = run_monte_carlo(prepared, settings, {});
  const OutputStatistics* s = result.find("net_cost_per_basis");
  REQUIRE(s != nullptr);
  // 3 h of labour at U(20, 40) USD/h: the output spans up to 60 USD (hand arithmetic).
  CHECK(s->maximum - s->minimum > 30.0);
  CHECK(s->maximum - s->minimum <= 60.0 + 1e-9);
}

TEST_CASE("monte carlo: failed samples are counted with their first error") {
  // Outlet temperature ~ N(60 degC, 400 K): about 20 % of the draws lie below
  // absolute zero (z < -0.83) and the case refuses them.
  const auto path = case_with_uncertainty("failing", R"(uncertainty:
  samples: 200
  parameters:
    - {path: blocks.warm.outlet_temperature, distribution: normal, mean: "60 degC", standard_deviation: "400 K"}
)");
  const PreparedCase prepared(path);
  const auto result = run_monte_carlo(prepared, read_uncertainty_settings(prepared), {});
  // About 40 expected below absolute zero; hot draws may fail too, so only broad bounds.
  CHECK(result.failed > 10);
  CHECK(result.failed < 150);
  REQUIRE(result.first_failed_sample.has_value());
  CHECK_FALSE(result.first_error.empty());
  CHECK(result.find("net_cost_per_basis")->count == 200 - result.failed);
}

TEST_CASE("monte carlo: a bad uncertainty section is an input error before sampling") {
  SUBCASE("low above high") {
    const auto text = input_error_text(case_with_uncertainty("low_high", R"(uncertainty:
  parameters:
    - {path: prices.labour_rate, distribution: uniform, low: "40 USD/h", high: "20 USD/h"}
)"));
    // The third line of the section, at the '{' of the entry.
    const std::string where = ":" + std::to_string(lines_before_section() + 3) + ":7: error: ";
    CHECK(text.find(where + "'uncertainty.parameters[0]': uniform distribution: low must be below high") !=
          std::string::npos);
  }
  SUBCASE("negative spread") {
    const auto text = input_error_text(case_with_uncertainty("negative", R"(uncertainty:
  parameters:
    - {path: blocks.warm.outlet_temperature, distribution: normal, mean: "60 degC", standard_deviation: "-5 K"}
)"));
    CHECK(text.find("standard_deviation must be positive") != std::string::npos);
  }
  SUBCASE("unknown distribution, with a suggestion") {
    const auto text = input_error_text(case_with_uncertainty("unknown", R"(uncertainty:
  parameters:
    - {path: prices.labour_rate, distribution: trianglar, low: "20 USD/h", mode: "30 USD/h", high: "40 USD/h"}
)"));
    CHECK(text.find("unknown distribution") != std::string::npos);
    CHECK(text.find("did you mean 'triangular'") != std::string::npos);
    CHECK(text.find("unknown key") == std::string::npos);
  }
  SUBCASE("a path that names nothing") {
    const auto text = input_error_text(case_with_uncertainty("path", R"(uncertainty:
  parameters:
    - {path: prices.labor_rate, distribution: uniform, low: "20 USD/h", high: "40 USD/h"}
)"));
    CHECK(text.find("'uncertainty.parameters[0].path': 'prices.labor_rate' names nothing in the case") !=
          std::string::npos);
    CHECK(text.find("did you mean 'labour_rate'") != std::string::npos);
  }
  SUBCASE("values of different dimensions") {
    const auto text = input_error_text(case_with_uncertainty("dimension", R"(uncertainty:
  parameters:
    - {path: prices.labour_rate, distribution: uniform, low: "20 USD/h", high: "40 kg"}
)"));
    CHECK(text.find("'uncertainty.parameters[0].high'") != std::string::npos);
  }
  SUBCASE("several mistakes are reported together") {
    const auto text = input_error_text(case_with_uncertainty("several", R"(uncertainty:
  samples: 0
  parameters:
    - {path: prices.labour_rate, distribution: uniform, low: "20 USD/h"}
    - {path: blocks.warm.outlet_temperature, distribution: normal, mean: "60 degC", standard_deviation: "5 K", skew: 1}
)"));
    CHECK(text.find("'uncertainty.samples'") != std::string::npos);
    CHECK(text.find("missing required key 'uncertainty.parameters[0].high'") != std::string::npos);
    CHECK(text.find("skew") != std::string::npos);
  }
  SUBCASE("no section") {
    const auto path = case_with_uncertainty("none", "");
    const PreparedCase prepared(path);
    CHECK_THROWS_WITH_AS(read_uncertainty_settings(prepared), doctest::Contains("no 'uncertainty' section"),
                         InputError);
  }
  SUBCASE("a value the key does not accept fails at the base case, before sampling") {
    const auto path = case_with_uncertainty("key_unit", R"(uncertainty:
  parameters:
    - {path: prices.labour_rate, distribution: uniform, low: "20 kg", high: "40 kg"}
)");
    const PreparedCase prepared(path);
    const auto settings = read_uncertainty_settings(prepared);
    bool sampled = false;
    MonteCarloOptions options;
    options.on_sample = [&](const SampleRecord&) { sampled = true; };
    CHECK_THROWS_AS(run_monte_carlo(prepared, settings, options), InputError);
    CHECK_FALSE(sampled);
  }
}
