// Quantities: parsing "number unit" strings into typed values.

#include <doctest/doctest.h>

#include <string>
#include <vector>

#include "flowsheet/unit_parser.hpp"
#include "python_reference.hpp"

using namespace unchain;

TEST_CASE("unit conversions agree with pint") {
  struct Case {
    std::string ours;
    std::string pint_quantity;
    std::string pint_unit;
  };
  // Source: pint (Debian python3-pint) unit registry, computed at test time.
  const std::vector<Case> cases = {
      {"1 mmHg", "1 mmHg", "Pa"},       {"35 mmHg", "35 mmHg", "Pa"},    {"14.7 psi", "14.7 psi", "Pa"},
      {"1 atm", "1 atm", "Pa"},         {"101.325 kPa", "101.325 kPa", "Pa"}, {"2 bar", "2 bar", "Pa"},
      {"1 torr", "1 torr", "Pa"},       {"3 lb", "3 lb", "kg"},          {"0.5 t", "0.5 metric_ton", "kg"},
      {"2.5 kWh", "2.5 kWh", "J"},      {"1 kcal", "1 kcal", "J"},       {"1.5 L", "1.5 L", "m**3"},
      {"250 mL", "250 mL", "m**3"},     {"2 gal", "2 gallon", "m**3"},   {"45 min", "45 min", "s"},
      {"1.5 h", "1.5 hour", "s"},       {"2 d", "2 day", "s"},           {"18 kg/m3", "18 kg/m**3", "kg/m**3"},
      {"600 W", "600 W", "W"},          {"3 kW", "3 kW", "W"},           {"12 cm", "12 cm", "m"},
      {"60 kWh/t", "60 kWh/metric_ton", "J/kg"}, {"4.18 kJ/(kg K)", "4.18 kJ/(kg*K)", "J/(kg*K)"},
      {"300 W/(m2 K)", "300 W/(m**2*K)", "W/(m**2*K)"}, {"2 m3/h", "2 m**3/hour", "m**3/s"},
      {"1 BTU", "1 Btu", "J"},
  };
  std::string script = "import pint\nu = pint.UnitRegistry()\n";
  for (const auto& c : cases)
    script += "print(u.Quantity('" + c.pint_quantity + "').to('" + c.pint_unit + "').magnitude)\n";
  const std::vector<double> reference = testing::python_numbers(script);
  REQUIRE(reference.size() == cases.size());
  for (std::size_t i = 0; i < cases.size(); ++i) {
    CAPTURE(cases[i].ours);
    // pint's BTU is the ISO 31-4 value 1055.056 J, ours the International
    // Table value 1055.05585262 J: they differ by 1.4e-7 relative.
    CHECK(parse_quantity(cases[i].ours).si_value() == doctest::Approx(reference[i]).epsilon(1e-6));
  }
}

TEST_CASE("absolute temperatures apply the scale offset, differences do not") {
  // Source: pint offset units, computed at test time.
  const auto ref = testing::python_numbers(
      "import pint\nu = pint.UnitRegistry()\n"
      "print(u.Quantity(450, u.degC).to('K').magnitude)\n"
      "print(u.Quantity(212, u.degF).to('K').magnitude)\n"
      "print(u.Quantity(-40, u.degF).to('K').magnitude)\n");
  REQUIRE(ref.size() == 3);
  CHECK(in_kelvin(parse_as<Temperature>("450 degC")) == doctest::Approx(ref[0]).epsilon(1e-12));
  CHECK(in_kelvin(parse_as<Temperature>("212 degF")) == doctest::Approx(ref[1]).epsilon(1e-12));
  CHECK(in_kelvin(parse_as<Temperature>("-40 degF")) == doctest::Approx(ref[2]).epsilon(1e-12));
  CHECK(in_kelvin(parse_as<Temperature>("300 K")) == doctest::Approx(300.0));
  // A difference of 10 degC is 10 K; of 18 degF is 10 K.
  CHECK(to_si(parse_as<TemperatureDifference>("10 degC")) == doctest::Approx(10.0));
  CHECK(to_si(parse_as<TemperatureDifference>("18 degF")) == doctest::Approx(10.0));
  // In a compound unit the temperature is always a difference.
  CHECK(to_si(parse_as<SpecificHeatCapacity>("1 J/(kg degC)")) == doctest::Approx(1.0));
}

TEST_CASE("below absolute zero is refused") {
  CHECK_THROWS_WITH_AS(parse_as<Temperature>("-300 degC"), doctest::Contains("below absolute zero"), UnitError);
}

TEST_CASE("wrong dimension names both dimensions") {
  CHECK_THROWS_WITH_AS(parse_as<Temperature>("1 kg"),
                       doctest::Contains("expected temperature (K), found mass (kg) from unit \"kg\""), UnitError);
  CHECK_THROWS_WITH_AS(parse_as<Pressure>("5 kWh"), doctest::Contains("expected pressure (Pa), found energy (J)"),
                       UnitError);
  CHECK_THROWS_WITH_AS(parse_as<Mass>("5"), doctest::Contains("a bare number"), UnitError);
}

TEST_CASE("unknown units, missing numbers and malformed expressions") {
  CHECK_THROWS_WITH_AS(parse_quantity("3 furlongs"), doctest::Contains("unknown unit \"furlongs\""), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity("kg"), doctest::Contains("missing number"), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity(""), doctest::Contains("empty value"), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity("3 W/m2 K"), doctest::Contains("ambiguous"), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity("3 J/(kg K"), doctest::Contains("missing ')'"), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity("nan kg"), doctest::Contains("not finite"), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity("inf kg"), doctest::Contains("not finite"), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity(".inf kg"), doctest::Contains("not finite"), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity("-.inf kg"), doctest::Contains("not finite"), UnitError);
  CHECK_THROWS_WITH_AS(parse_quantity("1e400 kg"), doctest::Contains("out of range"), UnitError);
}

TEST_CASE("money is its own dimension with the case currency") {
  const ParsedQuantity p = parse_quantity("0.21 USD/kWh");
  CHECK(p.currency == "USD");
  // 0.21 per kWh = 0.21 / 3.6e6 per J
  CHECK(p.si_value() == doctest::Approx(0.21 / 3.6e6).epsilon(1e-12));
  using PricePerEnergy = decltype(Money{} / Energy{});
  CHECK(to_si(parse_as<PricePerEnergy>("0.21 USD/kWh", "USD")) == doctest::Approx(0.21 / 3.6e6));
  CHECK_THROWS_WITH_AS(parse_as<PricePerEnergy>("0.21 EUR/kWh", "USD"),
                       doctest::Contains("wrong currency (expected USD, found EUR)"), UnitError);
  CHECK_THROWS_WITH_AS(parse_as<PricePerEnergy>("0.21 USD/kg", "USD"), doctest::Contains("wrong dimension"),
                       UnitError);
}

TEST_CASE("fractional exponents for solubility parameters") {
  // 1 MPa^0.5 = 1000 Pa^0.5
  CHECK(to_si(parse_as<SqrtPressure>("18.6 MPa^0.5")) == doctest::Approx(18600.0));
}

TEST_CASE("percent and plain numbers are dimensionless") {
  CHECK(parse_quantity("25 %").si_value() == doctest::Approx(0.25));
  CHECK(parse_quantity("0.4").dimension.is_dimensionless());
  CHECK(parse_quantity("+1.5e-3 kg").si_value() == doctest::Approx(1.5e-3));
  CHECK(parse_quantity("450degC").lone_temperature_unit);
}
