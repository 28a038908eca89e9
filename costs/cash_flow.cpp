#include "costs/cash_flow.hpp"

#include <boost/math/tools/toms748_solve.hpp>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <sstream>
#include <stdexcept>

#include "flowsheet/yaml_reader.hpp"

namespace unchain::costs {

namespace {

constexpr double seconds_per_year = 365.25 * 86400.0;  // Julian year, as the unit parser's "yr"
constexpr double max_hours_per_year = 366.0 * 24.0;

bool whole_number(double v) { return std::abs(v - std::round(v)) < 1e-6; }

std::string format(double v) {
  std::ostringstream out;
  out.precision(6);
  out << v;
  return out.str();
}

// Reads a duration in whole years, e.g. "15 yr"; an error unless it is a
// whole number of years within [low, high].
double read_whole_years(MappingReader& m, std::string_view key, double fallback, int low, int high) {
  const auto q = m.optional_quantity<Time>(key);
  if (!q) return fallback;
  const double years = to_si(*q) / seconds_per_year;
  if (!(years >= low - 1e-6 && years <= high + 1e-6) || !whole_number(years)) {
    m.error(key, "'" + m.path() + "." + std::string(key) + "' must be a whole number of years from " +
                     std::to_string(low) + " to " + std::to_string(high) + " (expected e.g. \"" +
                     std::to_string(std::max(low, 1)) + " yr\", found " + format(years) + " yr)");
    return fallback;
  }
  return std::round(years);
}

void check_settings(const CashFlowSettings& s) {
  auto fail = [](const std::string& what) { throw std::invalid_argument("economics: " + what); };
  if (!(s.project_life_years >= 1 && s.project_life_years <= 100 && whole_number(s.project_life_years)))
    fail("project life must be a whole number of years from 1 to 100 (found " + format(s.project_life_years) + ")");
  if (!(s.construction_years >= 1 && s.construction_years <= 10 && whole_number(s.construction_years)))
    fail("construction period must be a whole number of years from 1 to 10 (found " + format(s.construction_years) + ")");
  if (!(s.depreciation_years >= 1 && s.depreciation_years <= 100 && whole_number(s.depreciation_years)))
    fail("depreciation period must be a whole number of years from 1 to 100 (found " + format(s.depreciation_years) + ")");
  if (!(s.discount_rate > -1.0 && s.discount_rate <= 1.0))
    fail("discount rate must be above -1 and at most 1 per year (found " + format(s.discount_rate) + ")");
  if (!(s.tax_rate >= 0.0 && s.tax_rate < 1.0)) fail("tax rate must be from 0 to below 1 (found " + format(s.tax_rate) + ")");
  if (!(s.declining_balance_factor >= 1.0 && s.declining_balance_factor <= 5.0))
    fail("declining-balance factor must be from 1 to 5 (found " + format(s.declining_balance_factor) + ")");
  if (!(s.working_capital_fraction >= 0.0 && s.working_capital_fraction <= 5.0))
    fail("working capital fraction must be from 0 to 5 (found " + format(s.working_capital_fraction) + ")");
  if (s.salvage_fraction && !(*s.salvage_fraction >= 0.0 && *s.salvage_fraction <= 1.0))
    fail("salvage fraction must be from 0 to 1 (found " + format(*s.salvage_fraction) + ")");
  if (s.ramp_up.size() > static_cast<std::size_t>(std::lround(s.project_life_years)))
    fail("ramp-up lists more years than the project life");
  for (double f : s.ramp_up)
    if (!(f >= 0.0 && f <= 1.0)) fail("ramp-up fractions must be from 0 to 1 (found " + format(f) + ")");
}

// The year table for one set of inputs (no NPV search).
std::vector<CashFlowYear> year_table(const CashFlowSettings& s, const CashFlowInputs& in, const std::vector<double>& dep,
                                     double working_capital, double salvage) {
  const int construction = static_cast<int>(std::lround(s.construction_years));
  const int life = static_cast<int>(std::lround(s.project_life_years));
  std::vector<CashFlowYear> rows;
  rows.reserve(static_cast<std::size_t>(construction + life));
  for (int k = 0; k < construction; ++k) {
    CashFlowYear y;
    y.year = k;
    y.capital = -in.fixed_capital / construction;
    if (k == construction - 1) y.capital -= working_capital;  // working capital at start-up
    y.net_cash_flow = y.capital;
    rows.push_back(y);
  }
  const double full_revenue = in.annual_monomer_kg * in.monomer_price + in.annual_other_revenue;
  double losses = 0.0;
  for (int j = 1; j <= life; ++j) {
    CashFlowYear y;
    y.year = construction - 1 + j;
    y.operating_year = j;
    y.capacity = static_cast<std::size_t>(j) <= s.ramp_up.size() ? s.ramp_up[static_cast<std::size_t>(j - 1)] : 1.0;
    y.revenue = y.capacity * full_revenue;
    y.operating_cost = y.capacity * in.annual_operating_cost;
    y.depreciation = dep[static_cast<std::size_t>(j - 1)];
    y.taxable_income = y.revenue - y.operating_cost - y.depreciation;
    // Losses are carried forward without limit and set off against later
    // profit; no refund is paid on a loss.
    if (y.taxable_income > 0.0) {
      const double set_off = std::min(losses, y.taxable_income);
      losses -= set_off;
      y.tax = s.tax_rate * (y.taxable_income - set_off);
    } else {
      losses -= y.taxable_income;
    }
    y.loss_carried_forward = losses;
    if (j == life) y.capital = working_capital + salvage;
    y.net_cash_flow = y.revenue - y.operating_cost - y.tax + y.capital;
    rows.push_back(y);
  }
  double cumulative = 0.0;
  for (auto& y : rows) {
    y.discounted_cash_flow = y.net_cash_flow / std::pow(1.0 + s.discount_rate, y.year);
    cumulative += y.discounted_cash_flow;
    y.cumulative_discounted = cumulative;
  }
  return rows;
}

double table_npv(const std::vector<CashFlowYear>& rows) { return rows.empty() ? 0.0 : rows.back().cumulative_discounted; }

// Bracketed root of f in [a, b] (f(a), f(b) of opposite sign) by TOMS 748.
template <class F>
double bracketed_root(F f, double a, double b, double fa, double fb) {
  if (fa == 0.0) return a;
  if (fb == 0.0) return b;
  std::uintmax_t iterations = 200;
  const auto bracket =
      boost::math::tools::toms748_solve(f, a, b, fa, fb, boost::math::tools::eps_tolerance<double>(50), iterations);
  return 0.5 * (bracket.first + bracket.second);
}

}  // namespace

std::vector<double> internal_rates_of_return(const std::vector<double>& flows) {
  // The rates scanned: `points` steps even in log(1 + r) from -95 % to
  // 1000 %; every sign change between neighbours is a root, refined by
  // TOMS 748 within that step.
  constexpr int points = 800;
  const double low = std::log(0.05), high = std::log(11.0);
  auto f = [&](double r) { return net_present_value(flows, r); };
  auto rate = [&](int k) { return std::exp(low + (high - low) * k / points) - 1.0; };
  std::vector<double> roots;
  // One step of the scan, from (r0, f0) to k.
  double r0 = rate(0), f0 = f(r0);
  auto step = [&](int k) {
    const double r1 = rate(k);
    const double f1 = f(r1);
    if (f0 == 0.0) roots.push_back(r0);
    else if (f1 != 0.0 && (f0 < 0.0) != (f1 < 0.0)) roots.push_back(bracketed_root(f, r0, r1, f0, f1));
    r0 = r1;
    f0 = f1;
  };
  // NPV is a polynomial in 1 / (1 + r), so by Descartes' rule of signs it
  // has at most as many roots as the flows change sign. With one change at
  // most, a stretch of the scan whose ends have the same sign (and are not
  // zero) holds no root, and only the stretches that do are scanned step by
  // step: the same steps, the same roots, a tenth of the work.
  int sign_changes = 0;
  double last = 0.0;
  for (double flow : flows) {
    if (flow == 0.0 || !std::isfinite(flow)) {
      if (!std::isfinite(flow)) sign_changes = 2;  // no shortcut for a broken series
      continue;
    }
    if (last != 0.0 && (last < 0.0) != (flow < 0.0)) ++sign_changes;
    last = flow;
  }
  constexpr int stride = 16;  // steps per stretch; divides `points`
  if (sign_changes <= 1) {
    for (int k = 0; k < points; k += stride) {
      const double r_end = rate(k + stride);
      const double f_end = f(r_end);
      if (f0 == 0.0 || f_end == 0.0 || (f0 < 0.0) != (f_end < 0.0)) {
        for (int j = k + 1; j <= k + stride; ++j) step(j);
      } else {
        r0 = r_end;
        f0 = f_end;
      }
    }
  } else {
    for (int k = 1; k <= points; ++k) step(k);
  }
  if (f0 == 0.0) roots.push_back(r0);
  return roots;
}

double net_present_value(const std::vector<double>& net_cash_flows, double rate) {
  if (!(rate > -1.0)) throw std::invalid_argument("discount rate must be above -1 (found " + format(rate) + ")");
  double npv = 0.0, factor = 1.0;
  for (double flow : net_cash_flows) {
    npv += flow / factor;
    factor *= 1.0 + rate;
  }
  return npv;
}

std::vector<double> depreciation_schedule(const CashFlowSettings& s, double fixed_capital, double salvage) {
  check_settings(s);
  const int life = static_cast<int>(std::lround(s.project_life_years));
  const int period = static_cast<int>(std::lround(s.depreciation_years));
  std::vector<double> d(static_cast<std::size_t>(life), 0.0);
  if (!(fixed_capital - salvage > 0.0)) return d;
  double book = fixed_capital;
  for (int j = 1; j <= std::min(life, period); ++j) {
    // Straight line on what is left to depreciate over the years left; for
    // the straight-line method this is (FC - S) / n every year.
    const double straight = (book - salvage) / (period - j + 1);
    double amount = straight;
    if (s.depreciation == DepreciationMethod::declining_balance)
      // Declining balance, switching to straight line from the year that
      // gives more (common practice), never below the salvage value.
      amount = std::min(std::max(book * s.declining_balance_factor / period, straight), book - salvage);
    d[static_cast<std::size_t>(j - 1)] = amount;
    book -= amount;
  }
  // A plant retired before it is written down: the book value above
  // salvage is a loss on disposal, deducted in the last year.
  if (book - salvage > 1e-12 * fixed_capital) d.back() += book - salvage;
  return d;
}

CashFlowSettings read_cash_flow_settings(const Case& c, DiagnosticList& diagnostics) {
  CashFlowSettings s;
  if (!c.document.IsMap() || !c.document["economics"].IsDefined()) return s;
  MappingReader m(c.document["economics"], c.file, "economics", diagnostics, c.currency);
  if (!m.is_valid()) return s;
  s.present = true;

  s.project_life_years = read_whole_years(m, "project_life", s.project_life_years, 1, 100);
  s.construction_years = read_whole_years(m, "construction_period", s.construction_years, 1, 10);
  if (auto rate = m.optional_number("discount_rate")) {
    if (*rate > -1.0 && *rate <= 1.0) s.discount_rate = *rate;
    else
      m.error("discount_rate", "'economics.discount_rate' must be a fraction per year above -1 and at most 1 "
                               "(expected e.g. 0.10 for 10 % a year, found " + format(*rate) + ")");
  }
  if (auto tax = m.optional_number("tax_rate")) {
    if (*tax >= 0.0 && *tax < 1.0) s.tax_rate = *tax;
    else
      m.error("tax_rate", "'economics.tax_rate' must be a fraction from 0 to below 1 (expected e.g. 0.25, found " +
                              format(*tax) + ")");
  }
  s.working_capital_fraction = m.number_in("working_capital_fraction", s.working_capital_fraction, 0.0, 5.0);
  s.salvage_fraction = m.optional_number_in("salvage_fraction", 0.0, 1.0);

  if (auto dep = m.optional_mapping("depreciation")) {
    if (auto method = dep->optional_text("method")) {
      if (*method == "straight_line") s.depreciation = DepreciationMethod::straight_line;
      else if (*method == "declining_balance") s.depreciation = DepreciationMethod::declining_balance;
      else
        dep->error("method", "'economics.depreciation.method' must be straight_line or declining_balance (found " +
                                 *method + ")");
    }
    s.depreciation_years = read_whole_years(*dep, "period", s.depreciation_years, 1, 100);
    if (dep->has("factor") && s.depreciation != DepreciationMethod::declining_balance)
      dep->warning("factor", "'economics.depreciation.factor' is used only by the declining_balance method");
    s.declining_balance_factor = dep->number_in("factor", s.declining_balance_factor, 1.0, 5.0);
    dep->finish();
  }

  const YAML::Node ramp = m.raw("ramp_up");
  if (ramp.IsDefined() && ramp.IsSequence()) {
    std::size_t index = 0;
    for (const auto& item : ramp) {
      const std::string where = "economics.ramp_up[" + std::to_string(index++) + "]";
      double f = -1.0;
      try {
        if (item.IsScalar()) f = item.as<double>();
      } catch (const std::exception&) {
      }
      if (f >= 0.0 && f <= 1.0) s.ramp_up.push_back(f);
      else
        diagnostics.error(location_of(item, c.file), "'" + where + "' must be a capacity fraction from 0 to 1 (found " +
                                                         (item.IsScalar() ? item.Scalar() : std::string("a list or mapping")) + ")");
    }
    if (s.ramp_up.size() > static_cast<std::size_t>(std::lround(s.project_life_years)))
      m.error("ramp_up", "'economics.ramp_up' lists " + std::to_string(s.ramp_up.size()) +
                             " years, more than the project life of " + format(s.project_life_years) + " years");
  } else if (ramp.IsDefined() && !ramp.IsNull()) {
    m.error("ramp_up", "'economics.ramp_up' must be a list of capacity fractions (expected e.g. [0.5, 0.8])");
  }

  s.batches_per_year = m.optional_number_in("batches_per_year", 1.0, 1e6);
  if (auto time = m.optional_quantity<Time>("operating_time_per_year")) {
    const double hours = to_si(*time) / 3600.0;
    if (hours > 0.0 && hours <= max_hours_per_year) s.operating_hours_per_year = hours;
    else
      m.error("operating_time_per_year", "'economics.operating_time_per_year' must be above 0 and at most 8784 h "
                                         "(expected e.g. \"8000 h\", found " + format(hours) + " h)");
  }
  if (c.basis == Basis::batch && s.operating_hours_per_year)
    m.warning("operating_time_per_year", "'economics.operating_time_per_year' is not used by a batch case "
                                         "(batches_per_year sets the annual amount)");
  if (c.basis != Basis::batch && s.batches_per_year)
    m.warning("batches_per_year", "'economics.batches_per_year' is not used by a continuous case "
                                  "(operating_time_per_year sets the annual amount)");
  m.finish();
  return s;
}

CashFlowResult discounted_cash_flow(const CashFlowSettings& settings, const CashFlowInputs& inputs) {
  check_settings(settings);
  CashFlowResult r;
  r.inputs = inputs;
  r.discount_rate = settings.discount_rate;
  r.salvage_value = inputs.fixed_capital * settings.salvage_fraction.value_or(0.0);
  r.working_capital = settings.working_capital_fraction * std::max(0.0, inputs.annual_operating_cost);
  const std::vector<double> dep = depreciation_schedule(settings, inputs.fixed_capital, r.salvage_value);
  r.years = year_table(settings, inputs, dep, r.working_capital, r.salvage_value);
  r.npv = table_npv(r.years);
  if (settings.depreciation_years > settings.project_life_years && inputs.fixed_capital > r.salvage_value)
    r.notes.push_back("the depreciation period is longer than the project life: the book value left at the end is "
                      "deducted as a loss on disposal in the last year");

  // Internal rate of return.
  std::vector<double> flows;
  for (const auto& y : r.years) flows.push_back(y.net_cash_flow);
  const std::vector<double> roots = internal_rates_of_return(flows);
  if (roots.empty()) {
    r.notes.push_back("no discount rate from -95 % to 1000 % a year makes the NPV zero: no internal rate of return");
  } else {
    r.irr = roots.front();
    if (roots.size() > 1)
      r.notes.push_back("the cash flows change sign more than once: " + std::to_string(roots.size()) +
                        " rates make the NPV zero; the lowest is reported as the internal rate of return");
  }

  // Simple payback from start-up (undiscounted), interpolated in the year.
  const int construction = static_cast<int>(std::lround(settings.construction_years));
  double cumulative = 0.0;
  for (int k = 0; k < construction; ++k) cumulative += r.years[static_cast<std::size_t>(k)].net_cash_flow;
  if (cumulative >= 0.0) r.payback_years = 0.0;
  for (std::size_t i = static_cast<std::size_t>(construction); i < r.years.size() && !r.payback_years; ++i) {
    const double flow = r.years[i].net_cash_flow;
    if (flow > 0.0 && cumulative + flow >= 0.0)
      r.payback_years = (r.years[i].operating_year - 1) + (-cumulative) / flow;
    cumulative += flow;
  }
  if (!r.payback_years) r.notes.push_back("the investment is not paid back within the project life");

  // Minimum selling price: the monomer price with NPV zero. NPV rises
  // strictly with the price (tax takes less than all of each extra unit), so
  // the root is unique once bracketed.
  if (inputs.annual_monomer_kg > 0.0) {
    auto npv_at = [&](double price) {
      CashFlowInputs trial = inputs;
      trial.monomer_price = price;
      return table_npv(year_table(settings, trial, dep, r.working_capital, r.salvage_value));
    };
    double step = std::max(1.0, std::abs(inputs.monomer_price));
    double lo = 0.0, hi = std::max(1.0, 2.0 * inputs.monomer_price);
    double f_lo = npv_at(lo), f_hi = npv_at(hi);
    for (int k = 0; k < 80 && f_lo > 0.0; ++k, step *= 2.0) f_lo = npv_at(lo -= step);
    for (int k = 0; k < 80 && f_hi < 0.0; ++k, step *= 2.0) f_hi = npv_at(hi += step);
    if (f_lo <= 0.0 && f_hi >= 0.0) {
      r.minimum_selling_price = bracketed_root(npv_at, lo, hi, f_lo, f_hi);
    } else {
      r.notes.push_back("no monomer price makes the NPV zero (the search stopped at " + format(lo) + " to " +
                        format(hi) + " per kg)");
    }
  } else {
    r.notes.push_back("no monomer in a year: no minimum selling price");
  }
  return r;
}

}  // namespace unchain::costs
