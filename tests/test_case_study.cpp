// PreparedCase: one parse, many evaluations with overrides; key figures;
// the path check and value conversions shared by the studies.

#include <doctest/doctest.h>

#include <future>
#include <string>
#include <vector>

#include "costs/case_study.hpp"
#include "costs/closure_check.hpp"

using namespace unchain;
using namespace unchain::costs;

namespace {

const std::string heat_case = std::string(UNCHAIN_SOURCE_DIR) + "/tests/cli/study_heat.yaml";
const std::string shared_prices_case = std::string(UNCHAIN_SOURCE_DIR) + "/tests/cli/study_heat_shared_prices.yaml";

}  // namespace

TEST_CASE("case study: key figures come in the documented order with units") {
  const PreparedCase prepared(heat_case);
  const CaseFigures f = prepared.evaluate();
  const std::vector<std::string> keys{"monomer_per_basis",       "monomer_purity",     "energy_per_kg_monomer",
                                      "net_cost_per_basis",      "net_cost_per_kg_monomer", "labour_share",
                                      "solvent_lost_per_kg_monomer", "installed_capital", "npv",
                                      "irr",                     "payback",            "minimum_selling_price"};
  REQUIRE(f.figures.size() == keys.size());
  for (std::size_t i = 0; i < keys.size(); ++i) CHECK(f.figures[i].key == keys[i]);
  CHECK(f.basis_label == "batch");
  CHECK(f.currency == "USD");
  CHECK(f.find("net_cost_per_kg_monomer")->unit == "USD/kg");
  CHECK(f.find("energy_per_kg_monomer")->unit == "MJ/kg");
  // 1 kg of styrene fed, all of it leaves as the monomer product.
  CHECK(f.value("monomer_per_basis").value() == doctest::Approx(1.0).epsilon(1e-12));
  CHECK(f.value("monomer_purity").value() == doctest::Approx(1.0).epsilon(1e-12));
  CHECK(f.find("no_such_figure") == nullptr);
}

TEST_CASE("case study: an override changes a linear cost by price x quantity") {
  const PreparedCase prepared(heat_case);
  const auto base = prepared.evaluate();
  const auto dearer = prepared.evaluate({{"prices.labour_rate", "40 USD/h"}});
  // 0.5 h of labour per batch: 10 USD/h more costs 5 USD more per batch (hand arithmetic).
  CHECK(dearer.value("net_cost_per_basis").value() - base.value("net_cost_per_basis").value() ==
        doctest::Approx(5.0).epsilon(1e-12));
  // The override is applied to a copy: the next evaluation is the base case again.
  CHECK(prepared.evaluate().value("net_cost_per_basis").value() ==
        doctest::Approx(base.value("net_cost_per_basis").value()).epsilon(1e-15));
  // Labour 15 USD of the total (hand arithmetic: 30 USD/h x 0.5 h).
  CHECK(base.value("labour_share").value() * (base.value("net_cost_per_basis").value()) ==
        doctest::Approx(15.0).epsilon(1e-12));
}

TEST_CASE("case study: base overrides apply to every evaluation") {
  const PreparedCase prepared(heat_case, {{"prices.labour_hours_per_batch", "1 h"}});
  const auto base = prepared.evaluate();
  const auto dearer = prepared.evaluate({{"prices.labour_rate", "40 USD/h"}});
  // Now 1 h per batch: 10 USD/h more costs 10 USD more.
  CHECK(dearer.value("net_cost_per_basis").value() - base.value("net_cost_per_basis").value() ==
        doctest::Approx(10.0).epsilon(1e-12));
  CHECK_THROWS_AS(PreparedCase(heat_case, {{"nowhere.at_all", "1"}}), InputError);
}

TEST_CASE("case study: evaluate is safe and identical on several threads") {
  const PreparedCase prepared(heat_case);
  const auto expected = prepared.evaluate({{"prices.labour_rate", "35 USD/h"}});
  std::vector<std::future<CaseFigures>> futures;
  for (int i = 0; i < 8; ++i)
    futures.push_back(std::async(std::launch::async, [&] {
      return prepared.evaluate({{"prices.labour_rate", "35 USD/h"}});
    }));
  for (auto& f : futures) {
    const auto got = f.get();
    for (std::size_t k = 0; k < got.figures.size(); ++k) CHECK(got.figures[k].value == expected.figures[k].value);
  }
}

TEST_CASE("case study: cost settings read once are reused only where the overrides leave them alone") {
  const PreparedCase prepared(heat_case);
  // A price override leaves accounting, capital and economics alone: the
  // settings read by the first evaluation serve the second, and the figures
  // are those of an evaluation that reads everything afresh.
  const auto base = prepared.evaluate();
  const auto priced = prepared.evaluate({{"prices.labour_rate", "35 USD/h"}});
  const auto fresh = prepared.evaluate_full({{"prices.labour_rate", "35 USD/h"}}).figures;
  REQUIRE(priced.figures.size() == fresh.figures.size());
  for (std::size_t k = 0; k < fresh.figures.size(); ++k) CHECK(priced.figures[k].value == fresh.figures[k].value);
  // An economics override has them read again: the NPV moves with the rate
  // (8 % in the case) ...
  const auto discounted = prepared.evaluate({{"economics.discount_rate", "0.2"}});
  const auto discounted_fresh = prepared.evaluate_full({{"economics.discount_rate", "0.2"}}).figures;
  REQUIRE(base.value("npv").has_value());
  CHECK(discounted.value("npv").value() != doctest::Approx(base.value("npv").value()).epsilon(1e-6));
  CHECK(discounted.value("npv").value() == discounted_fresh.value("npv").value());
  // ... and does not leave its settings behind for the evaluations after it.
  CHECK(prepared.evaluate().value("npv").value() == base.value("npv").value());
  // Renaming the monomer stream through a block's outlets is checked against
  // the accounting section again, not passed by the settings read before.
  CHECK_THROWS_AS(prepared.evaluate({{"blocks.warm.outlets.product", "elsewhere"}}), InputError);
}

TEST_CASE("case study: a bad override value or path is an InputError") {
  const PreparedCase prepared(heat_case);
  CHECK_THROWS_AS(prepared.evaluate({{"prices.labour_rate", "40 kg"}}), InputError);
  CHECK_THROWS_AS(prepared.evaluate({{"blocks.nowhere.temperature", "40 degC"}}), InputError);
  CHECK_THROWS_AS(PreparedCase("/no/such/case.yaml"), InputError);
}

TEST_CASE("case study: a price given only in the shared price file can be overridden") {
  const PreparedCase prepared(shared_prices_case);
  const auto base = prepared.evaluate();
  const auto dearer = prepared.evaluate({{"prices.labour_rate", "38 USD/h"}});
  // The shared file gives 28 USD/h for 3 h per batch: +10 USD/h is +30 USD (hand arithmetic).
  CHECK(dearer.value("net_cost_per_basis").value() - base.value("net_cost_per_basis").value() ==
        doctest::Approx(30.0).epsilon(1e-12));
  // A value deep inside a section that only the file gives: the grade price of styrene.
  CHECK(prepared.evaluate_full().report.monomer_price.value() == doctest::Approx(1.50));  // illustrative_lab.yaml
  const auto repriced = prepared.evaluate_full({{"prices.products.styrene.0.price", "2.50 USD/kg"}});
  CHECK(repriced.report.monomer_price.value() == doctest::Approx(2.50).epsilon(1e-12));
  // As a base override too.
  const PreparedCase dearer_base(shared_prices_case, {{"prices.products.styrene.0.price", "3 USD/kg"}});
  CHECK(dearer_base.evaluate_full().report.monomer_price.value() == doctest::Approx(3.0).epsilon(1e-12));
  // A bad value copied in this way is still checked: a purity above 1 is refused.
  CHECK_THROWS_AS(prepared.evaluate({{"prices.products.styrene.0.minimum_purity", "1.01"}}), InputError);
  // The copy is made per evaluation: the next one sees the file's price again.
  CHECK(prepared.evaluate_full().report.monomer_price.value() == doctest::Approx(1.50));
  CHECK_FALSE(missing_case_path(prepared.document(), prepared.path(), "prices.labour_rate"));
  CHECK_FALSE(missing_case_path(prepared.document(), prepared.path(), "prices.products.styrene.0.price"));
  CHECK(missing_case_path(prepared.document(), prepared.path(), "prices.labour_rat").has_value());
}

TEST_CASE("case study: reused copies give each evaluation its own overrides, over many uses and threads") {
  // evaluate() restores a pooled copy after each use and makes it afresh
  // after some uses. An electricity price that only the shared file gives
  // is written into the case's prices by the override and must be removed
  // again. 48 evaluations on 2 threads pass the refresh several times; each
  // must give what a fresh copy gives.
  const PreparedCase prepared(shared_prices_case);
  const std::vector<Override> dearer{{"prices.electricity", "0.60 USD/kWh"}};
  const double base = prepared.evaluate_full().figures.value("net_cost_per_basis").value();
  const double repriced = prepared.evaluate_full(dearer).figures.value("net_cost_per_basis").value();
  REQUIRE(repriced - base > 1e-3);  // 7 mUSD: the heater's electricity: the override moves the figure checked
  auto run = [&](int first) {
    std::vector<double> off;
    for (int i = first; i < first + 24; ++i) {
      const bool priced = i % 3 == 0;
      const double got = (priced ? prepared.evaluate(dearer) : prepared.evaluate()).value("net_cost_per_basis").value();
      off.push_back(got - (priced ? repriced : base));
    }
    return off;
  };
  auto other = std::async(std::launch::async, run, 1);
  const auto mine = run(0);
  for (const double d : mine) CHECK(d == 0.0);
  for (const double d : other.get()) CHECK(d == 0.0);
}

TEST_CASE("case study: a path that names nothing is explained with a suggestion") {
  const PreparedCase prepared(heat_case);
  CHECK_FALSE(missing_case_path(prepared.document(), prepared.path(), "blocks.warm.outlet_temperature"));
  CHECK_FALSE(missing_case_path(prepared.document(), prepared.path(), "prices.products.styrene.0.price"));
  const auto typo = missing_case_path(prepared.document(), prepared.path(), "blocks.warm.outlet_temperatur");
  REQUIRE(typo.has_value());
  CHECK(typo->find("no key 'outlet_temperatur'") != std::string::npos);
  CHECK(typo->find("did you mean 'outlet_temperature'") != std::string::npos);
  const auto index = missing_case_path(prepared.document(), prepared.path(), "prices.products.styrene.3.price");
  REQUIRE(index.has_value());
  CHECK(index->find("list of 1 items") != std::string::npos);
  CHECK(missing_case_path(prepared.document(), prepared.path(), "prices.electricity.kind").has_value());
}

TEST_CASE("case study: study values convert to the unit of their group") {
  // Source: 1 kWh = 3.6 MJ; 0 degC = 273.15 K; 1 degF difference = 5/9 K (SI brochure, common practice).
  CHECK(parse_study_value("0.36 USD/MJ", "0.24 USD/kWh", false) == doctest::Approx(1.296).epsilon(1e-12));
  CHECK(parse_study_value("773.15 K", "500 degC", false) == doctest::Approx(500.0).epsilon(1e-12));
  CHECK(parse_study_value("10 K", "500 degC", true) == doctest::Approx(10.0).epsilon(1e-12));
  CHECK(parse_study_value("9 degF", "500 degC", true) == doctest::Approx(5.0).epsilon(1e-12));
  CHECK(parse_study_value("0.5", "1", false) == doctest::Approx(0.5));
  CHECK_THROWS_AS(parse_study_value("3 kg", "0.24 USD/kWh", false), UnitError);
  CHECK_THROWS_AS(parse_study_value("0.2 EUR/kWh", "0.24 USD/kWh", false), UnitError);
  CHECK(parse_study_reference("0.24 USD/kWh").unit == "USD/kWh");
  CHECK(study_value_text(0.25, "USD/kWh") == "0.25 USD/kWh");
  CHECK(study_value_text(3, "") == "3");
}

TEST_CASE("closure check: a balance error above the limit is named") {
  SolveResult r;
  r.overall.mass_relative_error = 2e-6;
  r.overall.energy_relative_error = 0;
  BlockResult b;
  b.name = "dryer";
  b.balance.energy_relative_error = 1e-3;
  r.blocks.push_back(b);
  const auto problems = open_balances(r);
  REQUIRE(problems.size() == 2);
  CHECK(problems[0].find("mass balance of the whole flowsheet does not close") != std::string::npos);
  CHECK(problems[1].find("energy balance of block 'dryer'") != std::string::npos);
  r.overall.mass_relative_error = 1e-9;
  r.blocks[0].balance.energy_relative_error = 1e-7;
  CHECK(open_balances(r).empty());
}
