#pragma once
// Discounted cash flow of a plant built from a case: capital spent over the
// construction period, a ramp-up, revenue and operating cost per year,
// depreciation, tax and working capital; the net present value, internal
// rate of return, payback period and the minimum monomer selling price
// (the price at which the NPV is zero). Equations: docs/costing.md.

#include <optional>
#include <string>
#include <vector>

#include "flowsheet/case.hpp"
#include "flowsheet/diagnostics.hpp"

namespace unchain::costs {

enum class DepreciationMethod { straight_line, declining_balance };

// The `economics` section of a case. Rates are fractions per year.
struct CashFlowSettings {
  bool present = false;                 // the case has an economics section
  double project_life_years = 15;       // operating years after construction
  double discount_rate = 0.10;
  double tax_rate = 0.25;
  DepreciationMethod depreciation = DepreciationMethod::straight_line;
  double depreciation_years = 10;
  double declining_balance_factor = 2.0;  // 2 = double declining balance
  double working_capital_fraction = 0.10; // of the annual operating cost, recovered at the end
  double construction_years = 1;          // capital spent evenly over these years before start-up
  std::vector<double> ramp_up;            // capacity fraction in operating years 1, 2, ...; then 1
  std::optional<double> operating_hours_per_year;  // continuous basis
  std::optional<double> batches_per_year;          // batch basis
  std::optional<double> salvage_fraction;          // of fixed capital, at the end of life (default 0)
};

// What the cash flow is built from, per year at full capacity.
struct CashFlowInputs {
  double fixed_capital = 0;             // installed capital, case currency
  double annual_monomer_kg = 0;
  double monomer_price = 0;             // per kg
  double annual_other_revenue = 0;      // by-product credits
  double annual_operating_cost = 0;     // cash cost: no capital charge
};

struct CashFlowYear {
  int year = 0;                 // 0 .. construction_years-1 build; then operating years
  int operating_year = 0;       // 0 during construction, then 1, 2, ... after start-up
  double capacity = 0;          // fraction of full capacity
  double revenue = 0;
  double operating_cost = 0;
  double depreciation = 0;
  double taxable_income = 0;
  double tax = 0;
  double loss_carried_forward = 0;  // tax losses not yet set off, at the end of the year
  double capital = 0;           // capital and working capital spent (negative) or recovered
  double net_cash_flow = 0;
  double discounted_cash_flow = 0;
  double cumulative_discounted = 0;
};

struct CashFlowResult {
  std::vector<CashFlowYear> years;
  double npv = 0;
  std::optional<double> irr;                    // absent when no rate gives NPV = 0
  std::optional<double> payback_years;          // simple payback from start-up; absent if never
  std::optional<double> minimum_selling_price;  // monomer price per kg with NPV = 0
  std::vector<std::string> notes;
  CashFlowInputs inputs;                        // what the table was built from
  double discount_rate = 0;
  double working_capital = 0;                   // spent at start-up, recovered at the end
  double salvage_value = 0;                     // recovered at the end
};

CashFlowSettings read_cash_flow_settings(const Case& c, DiagnosticList& diagnostics);
// Throws std::invalid_argument for settings out of range (the reader
// reports those as input errors first).
CashFlowResult discounted_cash_flow(const CashFlowSettings& settings, const CashFlowInputs& inputs);
// Depreciation of `fixed_capital` less `salvage` in operating years 1..life
// (the remaining book value above salvage is written off in the last year).
std::vector<double> depreciation_schedule(const CashFlowSettings& settings, double fixed_capital, double salvage);
// NPV of a list of yearly net cash flows (year 0 undiscounted).
double net_present_value(const std::vector<double>& net_cash_flows, double rate);
// Every rate from -95 % to 1000 % a year that makes the NPV zero, lowest
// first (a scan in log(1 + r), each sign change refined by TOMS 748).
std::vector<double> internal_rates_of_return(const std::vector<double>& net_cash_flows);

}  // namespace unchain::costs
