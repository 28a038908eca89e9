#pragma once
// Reading "number unit" strings into typed quantities, once, at the input
// boundary.
//
// Grammar (whitespace between number and unit optional):
//   quantity  := number [unit]
//   unit      := factor { ("*" | " ") factor } [ "/" ( factor | "(" unit ")" ) ]...
//   factor    := symbol [exponent] | "(" unit ")" [exponent]
//   exponent  := digits (as in "m3") | "^" number (as in "MPa^0.5")
// A division is followed by one factor or a parenthesised group; "W/m2 K"
// is refused as ambiguous (write "W/(m2 K)").
//
// Temperatures: "degC", "degF" and "K" alone mean an absolute temperature
// when an absolute temperature is expected (offset applied) and a
// difference when a difference is expected (scale only). Inside compound
// units ("J/(kg K)") a temperature unit is always a difference.

#include <array>
#include <stdexcept>
#include <string>
#include <string_view>
#include <type_traits>

#include "flowsheet/quantity.hpp"

namespace unchain {

// Exponents of the base dimensions: mass, length, time, temperature,
// amount of substance, money. Fractional exponents occur (MPa^0.5).
struct Dimension {
  enum Base { mass, length, time, temperature, amount, money, count };
  std::array<double, count> exponents{};

  friend bool operator==(const Dimension& a, const Dimension& b);
  [[nodiscard]] bool is_dimensionless() const;
  // A readable name: "pressure (Pa)" for known dimensions, otherwise the
  // SI expression such as "kg m^-1 s^-2".
  [[nodiscard]] std::string describe() const;
};

class UnitError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

struct ParsedQuantity {
  double number = 0.0;            // as written
  double scale = 1.0;             // SI value per unit of the written unit
  double absolute_offset_K = 0.0; // only for a lone degC/degF: K at zero of the scale
  bool lone_temperature_unit = false;
  Dimension dimension;
  std::string currency;           // currency code written, if the unit has money in it
  std::string unit_text;          // the unit as written, for messages

  [[nodiscard]] double si_value() const { return number * scale; }
};

// Parses text; throws UnitError naming what was wrong (unknown unit,
// missing number, malformed expression). The message carries no location:
// the caller adds file, line, column and key.
ParsedQuantity parse_quantity(std::string_view text);

// The dimension a Boost.Units quantity type stands for.
template <class Q>
Dimension dimension_of();

// Converts a parsed value to the requested type, checking the dimension.
// Temperature (absolute) applies the scale offset and refuses values below
// absolute zero; TemperatureDifference never applies an offset. Money
// checks the currency against `expected_currency` when that is non-empty.
// Throws UnitError "expected <dimension>, found <dimension>" on mismatch.
template <class Q>
Q convert_parsed(const ParsedQuantity& parsed, std::string_view expected_currency = {});

// Convenience: parse and convert in one step.
template <class Q>
Q parse_as(std::string_view text, std::string_view expected_currency = {}) {
  return convert_parsed<Q>(parse_quantity(text), expected_currency);
}

// ---- implementation of the templates ------------------------------------

namespace detail {

template <class Tag>
constexpr int base_index() {
  if constexpr (std::is_same_v<Tag, bu::mass_base_dimension>) return Dimension::mass;
  else if constexpr (std::is_same_v<Tag, bu::length_base_dimension>) return Dimension::length;
  else if constexpr (std::is_same_v<Tag, bu::time_base_dimension>) return Dimension::time;
  else if constexpr (std::is_same_v<Tag, bu::temperature_base_dimension>) return Dimension::temperature;
  else if constexpr (std::is_same_v<Tag, bu::amount_base_dimension>) return Dimension::amount;
  else if constexpr (std::is_same_v<Tag, money_base_dimension>) return Dimension::money;
  else return -1;
}

template <class List>
struct dimension_exponents;

template <>
struct dimension_exponents<bu::dimensionless_type> {
  static void add(Dimension&) {}
};

template <class Item, class Next>
struct dimension_exponents<bu::list<Item, Next>> {
  static void add(Dimension& d) {
    using tag = typename Item::tag_type;
    using exponent = typename Item::value_type;
    constexpr int index = base_index<tag>();
    static_assert(index >= 0, "quantity uses a base dimension the parser does not know");
    d.exponents[index] += static_cast<double>(exponent::Numerator) / exponent::Denominator;
    dimension_exponents<Next>::add(d);
  }
};

template <class Unit>
struct unit_dimension {
  static Dimension get() {
    Dimension d;
    dimension_exponents<typename Unit::dimension_type>::add(d);
    return d;
  }
};

template <class Unit>
struct unit_dimension<bu::absolute<Unit>> : unit_dimension<Unit> {};

void check_dimension(const ParsedQuantity& parsed, const Dimension& expected);
double checked_temperature(const ParsedQuantity& parsed);
void check_currency(const ParsedQuantity& parsed, std::string_view expected_currency);

}  // namespace detail

template <class Q>
Dimension dimension_of() {
  return detail::unit_dimension<typename Q::unit_type>::get();
}

template <class Q>
Q convert_parsed(const ParsedQuantity& parsed, std::string_view expected_currency) {
  detail::check_dimension(parsed, dimension_of<Q>());
  if constexpr (std::is_same_v<Q, Temperature>) {
    return Q::from_value(detail::checked_temperature(parsed));
  } else {
    if (dimension_of<Q>().exponents[Dimension::money] != 0.0)
      detail::check_currency(parsed, expected_currency);
    return Q::from_value(parsed.si_value());
  }
}

}  // namespace unchain
