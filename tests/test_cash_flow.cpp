// The discounted cash flow: NPV and IRR against a textbook example and
// against scipy, the minimum selling price, depreciation by hand, the
// placing of construction and ramp-up years, and the reading of the
// `economics` section.

#include <doctest/doctest.h>

#include <cmath>
#include <sstream>

#include "costs/batch_economics.hpp"
#include "costs/cash_flow.hpp"
#include "flowsheet/case.hpp"
#include "flowsheet/solver.hpp"
#include "python_reference.hpp"
#include "units/block_registry.hpp"

using namespace unchain;
using namespace unchain::costs;

namespace {

// Settings with nothing but the discounting: no tax, no working capital,
// no salvage, a one-year build (the capital at t = 0).
CashFlowSettings plain_settings(double life, double rate) {
  CashFlowSettings s;
  s.present = true;
  s.project_life_years = life;
  s.discount_rate = rate;
  s.tax_rate = 0.0;
  s.working_capital_fraction = 0.0;
  s.construction_years = 1;
  s.depreciation_years = 1;
  return s;
}

// An invented plant used to compare against an independent Python model.
struct ReferencePlant {
  CashFlowSettings settings;
  CashFlowInputs inputs;
};

ReferencePlant reference_plant() {
  ReferencePlant p;
  CashFlowSettings& s = p.settings;
  s.present = true;
  s.project_life_years = 8;
  s.construction_years = 2;
  s.discount_rate = 0.12;
  s.tax_rate = 0.30;
  s.depreciation = DepreciationMethod::straight_line;
  s.depreciation_years = 6;
  s.working_capital_fraction = 0.15;
  s.ramp_up = {0.4, 0.85};
  s.salvage_fraction = 0.05;
  CashFlowInputs& in = p.inputs;
  in.fixed_capital = 1.0e6;
  in.annual_monomer_kg = 5.0e5;
  in.monomer_price = 1.4;
  in.annual_other_revenue = 5.0e4;
  in.annual_operating_cost = 4.2e5;
  return p;
}

const char* economics_case_head = R"(
case: {title: cash flow test case (invented), basis: batch, currency: USD}
components: [water]
feeds:
  water_in: {temperature: "20 degC", pressure: "1 atm", liquid: {water: "2 kg"}}
blocks:
  heater:
    type: heater
    inlets: {feed: water_in}
    outlets: {product: hot_water}
    outlet_temperature: "80 degC"
  split:
    type: splitter
    inlets: {feed: hot_water}
    outlets: {products: [side_water, product_water]}
    fractions: [0.25, 0.75]
prices:
  electricity: "0.20 USD/kWh"
  labour_rate: "30 USD/h"
  labour_hours_per_batch: "0.5 h"
  byproduct_chemicals: {water: "0.4 USD/kg"}
  products:
    water: [{minimum_purity: 0.9, price: "2 USD/kg"}]
accounting:
  monomer: {stream: product_water, component: water}
  byproducts:
    - {stream: side_water, credit: chemical, component: water}
capital:
  batches_per_year: 200
)";

Case economics_case(const std::string& economics) {
  return load_case(parse_yaml_text(std::string(economics_case_head) + economics, "econ.yaml"), units::builtin_blocks());
}

std::string errors_of(const std::string& economics) {
  const Case c = economics_case(economics);
  DiagnosticList d;
  (void)read_cash_flow_settings(c, d);
  std::string text;
  for (const auto& diag : d.all())
    if (diag.severity == Severity::error) text += diag.to_string() + "\n";
  return text;
}

}  // namespace

TEST_CASE("cash flow: NPV and IRR of the textbook two-year project") {
  // Source: Brealey, Myers & Allen, Principles of Corporate Finance, 10th ed.,
  // ch. 5, section "Internal (or discounted-cash-flow) rate of return"
  // (from memory): C0 = -4,000, C1 = +2,000, C2 = +4,000; IRR = 28.08 %.
  // The book quotes the IRR to four figures.
  const std::vector<double> flows{-4000, 2000, 4000};
  CHECK(net_present_value(flows, 0.0) == doctest::Approx(2000.0));
  // Hand calculation: -4000 + 2000/1.1 + 4000/1.21 = 1123.97.
  CHECK(net_present_value(flows, 0.10) == doctest::Approx(1123.97).epsilon(1e-5));

  // The same flows built as a plant: 4000 capital at t = 0, revenue 4000 a
  // year, half capacity in the first operating year.
  CashFlowSettings s = plain_settings(2, 0.10);
  s.ramp_up = {0.5};
  CashFlowInputs in;
  in.fixed_capital = 4000;
  in.annual_monomer_kg = 1000;
  in.monomer_price = 4.0;
  const CashFlowResult r = discounted_cash_flow(s, in);
  REQUIRE(r.years.size() == 3);
  CHECK(r.years[0].net_cash_flow == doctest::Approx(-4000));
  CHECK(r.years[1].net_cash_flow == doctest::Approx(2000));
  CHECK(r.years[2].net_cash_flow == doctest::Approx(4000));
  CHECK(r.npv == doctest::Approx(1123.97).epsilon(1e-5));
  REQUIRE(r.irr.has_value());
  CHECK(*r.irr == doctest::Approx(0.2808).epsilon(2e-4));
  // Exact root of 2x^2 + x - 2 = 0 with x = 1/(1 + IRR) (hand algebra).
  CHECK(*r.irr == doctest::Approx(4.0 / (std::sqrt(17.0) - 1.0) - 1.0).epsilon(1e-10));
  // Payback: 2000 of 4000 back in year 1, the rest half-way through year 2.
  REQUIRE(r.payback_years.has_value());
  CHECK(*r.payback_years == doctest::Approx(1.5));
}

TEST_CASE("cash flow: two internal rates of return are detected") {
  // Source: Brealey, Myers & Allen, Principles of Corporate Finance, 10th ed.,
  // ch. 5, "Pitfall 2 - multiple rates of return" (from memory):
  // C0 = -1,600, C1 = +10,000, C2 = -10,000 has IRRs of 25 % and 400 %.
  const std::vector<double> flows{-1600, 10000, -10000};
  const std::vector<double> roots = internal_rates_of_return(flows);
  REQUIRE(roots.size() == 2);
  CHECK(roots[0] == doctest::Approx(0.25).epsilon(1e-10));
  CHECK(roots[1] == doctest::Approx(4.00).epsilon(1e-10));
  // Flows that never change sign have none.
  CHECK(internal_rates_of_return({-100, -50, -20}).empty());
  CHECK(internal_rates_of_return({100, 50}).empty());
}

TEST_CASE("cash flow: NPV and IRR of a taxed plant against an independent scipy model") {
  const ReferencePlant p = reference_plant();
  const CashFlowResult r = discounted_cash_flow(p.settings, p.inputs);
  // Source: the same plant modelled independently in Python with numpy,
  // and the IRR found by scipy.optimize.brentq (xtol 1e-14).
  const auto ref = unchain::testing::python_numbers(R"(
import numpy as np
from scipy.optimize import brentq
FC=1.0e6; C=2; N=8; i=0.12; tax=0.30; n=6; wcf=0.15; ramp=[0.4,0.85]; sf=0.05
kg=5.0e5; price=1.4; other=5.0e4; op=4.2e5
S=sf*FC; WC=wcf*op
flows=[-FC/C]*C; flows[-1]-=WC
loss=0.0
for j in range(1,N+1):
    cap = ramp[j-1] if j<=len(ramp) else 1.0
    rev=cap*(kg*price+other); cost=cap*op
    dep=(FC-S)/n if j<=n else 0.0
    ti=rev-cost-dep
    if ti>0:
        off=min(loss,ti); loss-=off; t=tax*(ti-off)
    else:
        loss+=-ti; t=0.0
    f=rev-cost-t
    if j==N: f+=WC+S
    flows.append(f)
t=np.arange(len(flows))
npv=lambda r: float(np.sum(np.array(flows)/(1.0+r)**t))
print(repr(npv(i)), repr(brentq(npv, -0.9, 10.0, xtol=1e-14)), repr(flows[2]), repr(flows[3]), repr(flows[-1]))
)");
  REQUIRE(ref.size() == 5);
  REQUIRE(r.years.size() == 10);
  CHECK(r.years[2].net_cash_flow == doctest::Approx(ref[2]).epsilon(1e-12));
  CHECK(r.years[3].net_cash_flow == doctest::Approx(ref[3]).epsilon(1e-12));
  CHECK(r.years[9].net_cash_flow == doctest::Approx(ref[4]).epsilon(1e-12));
  // Both sides sum the same ten terms in double precision.
  CHECK(r.npv == doctest::Approx(ref[0]).epsilon(1e-10));
  REQUIRE(r.irr.has_value());
  CHECK(*r.irr == doctest::Approx(ref[1]).epsilon(1e-9));
  // The first operating year makes a tax loss, carried into the second.
  CHECK(r.years[2].taxable_income < 0.0);
  CHECK(r.years[2].tax == 0.0);
  CHECK(r.years[2].loss_carried_forward == doctest::Approx(-r.years[2].taxable_income));
  CHECK(r.years[3].tax == doctest::Approx(0.30 * (r.years[3].taxable_income + r.years[2].taxable_income)));
  CHECK(r.years[3].loss_carried_forward == 0.0);
}

TEST_CASE("cash flow: the minimum selling price makes the NPV zero") {
  ReferencePlant p = reference_plant();
  const CashFlowResult r = discounted_cash_flow(p.settings, p.inputs);
  REQUIRE(r.minimum_selling_price.has_value());
  CHECK(*r.minimum_selling_price > 0.0);
  CHECK(*r.minimum_selling_price < p.inputs.monomer_price);  // the plant above earns more than 12 %
  p.inputs.monomer_price = *r.minimum_selling_price;
  const CashFlowResult at_msp = discounted_cash_flow(p.settings, p.inputs);
  // Tolerance: the root is found to about 1e-15 in price; NPV scales with
  // 5e5 kg a year, so 1e-6 of the capital is far above the rounding.
  CHECK(std::abs(at_msp.npv) < 1e-6 * p.inputs.fixed_capital);
  // At the minimum selling price the IRR is the discount rate.
  REQUIRE(at_msp.irr.has_value());
  CHECK(*at_msp.irr == doctest::Approx(0.12).epsilon(1e-8));

  // A plant that loses money at any price below a high one: the root is
  // still found by widening the bracket (a lab-sized case).
  CashFlowSettings s = plain_settings(10, 0.08);
  CashFlowInputs lab;
  lab.fixed_capital = 15000;
  lab.annual_monomer_kg = 90;
  lab.monomer_price = 1.5;
  lab.annual_operating_cost = 14000;
  const CashFlowResult lab_r = discounted_cash_flow(s, lab);
  CHECK(lab_r.npv < 0.0);
  CHECK_FALSE(lab_r.irr.has_value());
  CHECK_FALSE(lab_r.payback_years.has_value());
  REQUIRE(lab_r.minimum_selling_price.has_value());
  // No tax: MSP = (14000 + 15000 / annuity factor(8 %, 10 yr)) / 90; the
  // annuity factor 6.7101 (Source: compound-interest tables, (P/A, 8 %, 10);
  // from memory).
  CHECK(*lab_r.minimum_selling_price == doctest::Approx((14000 + 15000 / 6.7101) / 90).epsilon(1e-5));
}

TEST_CASE("cash flow: straight-line and declining-balance depreciation by hand") {
  CashFlowSettings s = plain_settings(5, 0.1);
  s.depreciation_years = 5;
  // Straight line: (1000 - 100) / 5 = 180 a year (hand calculation).
  auto d = depreciation_schedule(s, 1000, 100);
  REQUIRE(d.size() == 5);
  for (double v : d) CHECK(v == doctest::Approx(180));

  // Double declining balance, 5 years, no salvage: 40 % of book value, then
  // straight line on the rest from the year it gives more (common practice):
  // 400, 240, 144, then 216/2 = 108 twice (hand calculation).
  s.depreciation = DepreciationMethod::declining_balance;
  s.declining_balance_factor = 2.0;
  d = depreciation_schedule(s, 1000, 0);
  CHECK(d[0] == doctest::Approx(400));
  CHECK(d[1] == doctest::Approx(240));
  CHECK(d[2] == doctest::Approx(144));
  CHECK(d[3] == doctest::Approx(108));
  CHECK(d[4] == doctest::Approx(108));

  // With salvage 100 the book value never falls below it: 400, 240, 144,
  // 86.4, then only 29.6 is left (hand calculation).
  d = depreciation_schedule(s, 1000, 100);
  CHECK(d[3] == doctest::Approx(86.4));
  CHECK(d[4] == doctest::Approx(29.6));
  double total = 0;
  for (double v : d) total += v;
  CHECK(total == doctest::Approx(900));

  // 150 % declining balance over 4 years: 37.5 %: 375, 234.375, then
  // straight line 390.625 / 2 = 195.3125 twice (hand calculation).
  s.project_life_years = 4;
  s.depreciation_years = 4;
  s.declining_balance_factor = 1.5;
  d = depreciation_schedule(s, 1000, 0);
  CHECK(d[0] == doctest::Approx(375));
  CHECK(d[1] == doctest::Approx(234.375));
  CHECK(d[2] == doctest::Approx(195.3125));
  CHECK(d[3] == doctest::Approx(195.3125));

  // A depreciation period longer than the life: the rest is written off in
  // the last year: 100, 100, 100, then 1000 - 300 = 700.
  s.depreciation = DepreciationMethod::straight_line;
  s.depreciation_years = 10;
  d = depreciation_schedule(s, 1000, 0);
  CHECK(d[0] == doctest::Approx(100));
  CHECK(d[3] == doctest::Approx(700));
}

TEST_CASE("cash flow: construction, working capital, ramp-up and salvage fall in the right years") {
  CashFlowSettings s = plain_settings(4, 0.10);
  s.construction_years = 3;
  s.ramp_up = {0.5, 0.75};
  s.working_capital_fraction = 0.2;
  s.salvage_fraction = 0.1;
  CashFlowInputs in;
  in.fixed_capital = 900;
  in.annual_monomer_kg = 100;
  in.monomer_price = 10;
  in.annual_operating_cost = 500;
  const CashFlowResult r = discounted_cash_flow(s, in);
  REQUIRE(r.years.size() == 7);
  for (int t = 0; t < 7; ++t) CHECK(r.years[static_cast<std::size_t>(t)].year == t);
  // Three construction years, 300 each; working capital 0.2 x 500 = 100 at start-up.
  CHECK(r.years[0].capital == doctest::Approx(-300));
  CHECK(r.years[1].capital == doctest::Approx(-300));
  CHECK(r.years[2].capital == doctest::Approx(-400));
  CHECK(r.years[2].operating_year == 0);
  CHECK(r.years[2].revenue == 0.0);
  // Operating years 1..4 at t = 3..6 with capacities 0.5, 0.75, 1, 1.
  CHECK(r.years[3].operating_year == 1);
  CHECK(r.years[3].capacity == doctest::Approx(0.5));
  CHECK(r.years[3].revenue == doctest::Approx(500));
  CHECK(r.years[3].operating_cost == doctest::Approx(250));
  CHECK(r.years[4].capacity == doctest::Approx(0.75));
  CHECK(r.years[5].capacity == doctest::Approx(1.0));
  CHECK(r.years[6].capacity == doctest::Approx(1.0));
  // Working capital 100 and salvage 90 come back at the end of the last year.
  CHECK(r.years[6].capital == doctest::Approx(190));
  CHECK(r.years[6].net_cash_flow == doctest::Approx(1000 - 500 + 190));
  // Discounting at the end of each year from t = 0.
  CHECK(r.years[6].discounted_cash_flow == doctest::Approx(690 / std::pow(1.1, 6)));
  // Payback from start-up: -1000 at start-up; +250, +375, +500 -> in year 3
  // after 375/500 of it (hand calculation).
  REQUIRE(r.payback_years.has_value());
  CHECK(*r.payback_years == doctest::Approx(2.75));
}

TEST_CASE("cash flow: the economics section is read and checked") {
  const Case c = economics_case(R"(economics:
  project_life: "12 yr"
  discount_rate: 0.08
  tax_rate: 0.2
  depreciation: {method: declining_balance, period: "7 yr", factor: 1.5}
  working_capital_fraction: 0.05
  construction_period: "2 yr"
  ramp_up: [0.5, 0.8]
  batches_per_year: 100
  salvage_fraction: 0.1
)");
  DiagnosticList d;
  const CashFlowSettings s = read_cash_flow_settings(c, d);
  CHECK_FALSE(d.has_errors());
  CHECK(s.present);
  CHECK(s.project_life_years == 12);
  CHECK(s.discount_rate == doctest::Approx(0.08));
  CHECK(s.tax_rate == doctest::Approx(0.2));
  CHECK(s.depreciation == DepreciationMethod::declining_balance);
  CHECK(s.depreciation_years == 7);
  CHECK(s.declining_balance_factor == doctest::Approx(1.5));
  CHECK(s.construction_years == 2);
  CHECK(s.ramp_up == std::vector<double>{0.5, 0.8});
  CHECK(s.batches_per_year.value_or(0) == doctest::Approx(100));
  CHECK(s.salvage_fraction.value_or(0) == doctest::Approx(0.1));

  // The whole chain: 1.5 kg of "monomer" a batch at 2 USD/kg, 100 batches a
  // year; 0.5 kg a batch credited at 0.4 USD/kg (hand calculation).
  const CostReport report = evaluate_case_costs(c, solve(c));
  REQUIRE(report.cash_flow.has_value());
  const CashFlowInputs& in = report.cash_flow->inputs;
  CHECK(in.annual_monomer_kg == doctest::Approx(150));
  CHECK(in.monomer_price == doctest::Approx(2));
  CHECK(in.annual_operating_cost == doctest::Approx(report.total_cost * 100));
  CHECK(in.annual_other_revenue == doctest::Approx(0.4 * 0.5 * 100));
  // Operating cost: electricity and labour, no capital charge line.
  CHECK(in.annual_operating_cost > 0.5 * 30 * 100);
  CHECK(in.fixed_capital == doctest::Approx(report.capital.installed_total));
  CHECK(report.cash_flow->years.size() == 14);

  // Without economics_.batches_per_year the capital section's 200 is used.
  const Case defaulted = economics_case("economics: {project_life: \"5 yr\"}\n");
  const CostReport r2 = evaluate_case_costs(defaulted, solve(defaulted));
  REQUIRE(r2.cash_flow.has_value());
  CHECK(r2.cash_flow->inputs.annual_monomer_kg == doctest::Approx(300));
  // Without an economics section there is no cash flow.
  const Case none = economics_case("");
  CHECK_FALSE(evaluate_case_costs(none, solve(none)).cash_flow.has_value());
  // Without a monomer price: a note, no cash flow.
  std::string text = std::string(economics_case_head) + "economics: {project_life: \"5 yr\"}\n";
  const std::string products = "  products:\n    water: [{minimum_purity: 0.9, price: \"2 USD/kg\"}]\n";
  REQUIRE(text.find(products) != std::string::npos);
  text.erase(text.find(products), products.size());
  const Case unpriced = load_case(parse_yaml_text(text, "econ.yaml"), units::builtin_blocks());
  const CostReport r3 = evaluate_case_costs(unpriced, solve(unpriced));
  CHECK_FALSE(r3.cash_flow.has_value());
  bool noted = false;
  for (const auto& note : r3.notes) noted = noted || note.find("no price for the monomer") != std::string::npos;
  CHECK(noted);
}

TEST_CASE("cash flow: bad economics values give clear errors") {
  CHECK(errors_of("economics: {project_life: \"-5 yr\"}\n")
            .find("econ.yaml:30:27: error: 'economics.project_life' must be a whole number of years from 1 to 100") !=
        std::string::npos);
  CHECK(errors_of("economics: {project_life: \"7.5 yr\"}\n").find("found 7.5 yr") != std::string::npos);
  CHECK(errors_of("economics: {project_life: \"15 kg\"}\n").find("'economics.project_life'") != std::string::npos);
  CHECK(errors_of("economics: {discount_rate: -1}\n")
            .find("'economics.discount_rate' must be a fraction per year above -1 and at most 1") != std::string::npos);
  CHECK(errors_of("economics: {discount_rate: 10}\n").find("found 10") != std::string::npos);
  CHECK(errors_of("economics: {tax_rate: 1.2}\n").find("'economics.tax_rate' must be a fraction from 0 to below 1") !=
        std::string::npos);
  CHECK(errors_of("economics: {depreciation: {method: sum_of_digits}}\n")
            .find("must be straight_line or declining_balance (found sum_of_digits)") != std::string::npos);
  CHECK(errors_of("economics: {ramp_up: [0.5, 1.4]}\n")
            .find("'economics.ramp_up[1]' must be a capacity fraction from 0 to 1 (found 1.4)") != std::string::npos);
  CHECK(errors_of("economics: {project_life: \"2 yr\", ramp_up: [0.5, 0.7, 0.9]}\n")
            .find("more than the project life") != std::string::npos);
  CHECK(errors_of("economics: {construction_period: \"0 yr\"}\n").find("from 1 to 10") != std::string::npos);
  CHECK(errors_of("economics: {salvage_fraction: 1.5}\n").find("'economics.salvage_fraction' out of range") !=
        std::string::npos);
  // An unknown key gets a suggestion.
  CHECK(errors_of("economics: {discount_rte: 0.1}\n").find("did you mean 'discount_rate'") != std::string::npos);
  // Several mistakes are reported together.
  const std::string many = errors_of("economics: {tax_rate: -0.1, working_capital_fraction: -1}\n");
  CHECK(many.find("tax_rate") != std::string::npos);
  CHECK(many.find("working_capital_fraction") != std::string::npos);
  // Errors stop the costing as an InputError.
  const Case bad = economics_case("economics: {discount_rate: -2}\n");
  CHECK_THROWS_AS((void)evaluate_case_costs(bad, solve(bad)), InputError);
  // Called from code, bad settings are refused too.
  CashFlowSettings s;
  s.project_life_years = 0;
  CHECK_THROWS_WITH_AS((void)discounted_cash_flow(s, {}), doctest::Contains("project life"), std::invalid_argument);
  CHECK_THROWS_AS((void)net_present_value({1.0}, -1.0), std::invalid_argument);
}
