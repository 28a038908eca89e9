#include "flowsheet/unit_parser.hpp"

#include <algorithm>
#include <charconv>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <optional>
#include <string>
#include <vector>

#include "flowsheet/yaml_reader.hpp"  // closest_match, for suggestions

namespace unchain {

namespace {

using D = Dimension;

Dimension make_dimension(double m, double l, double t, double temp = 0, double n = 0, double money = 0) {
  Dimension d;
  d.exponents = {m, l, t, temp, n, money};
  return d;
}

struct UnitDefinition {
  std::string_view symbol;
  double scale;             // SI per unit
  Dimension dimension;
  double absolute_offset_K; // K at zero of this scale, for a lone temperature unit
};

// The units practitioners write. Exact factors where a definition fixes
// them: lb (international avoirdupois pound, 1959), atm (101325 Pa), mmHg
// (conventional millimetre of mercury, 133.322387415 Pa), torr (atm/760),
// psi (lbf/in^2 = 6894.757293168 Pa), thermochemical calorie (4.184 J),
// BTU (International Table, 1055.05585262 J). Source: NIST SP 811 (2008),
// Appendix B.
const std::vector<UnitDefinition>& unit_table() {
  static const Dimension mass = make_dimension(1, 0, 0);
  static const Dimension length = make_dimension(0, 1, 0);
  static const Dimension area = make_dimension(0, 2, 0);
  static const Dimension volume = make_dimension(0, 3, 0);
  static const Dimension time = make_dimension(0, 0, 1);
  static const Dimension temperature = make_dimension(0, 0, 0, 1);
  static const Dimension amount = make_dimension(0, 0, 0, 0, 1);
  static const Dimension energy = make_dimension(1, 2, -2);
  static const Dimension power = make_dimension(1, 2, -3);
  static const Dimension pressure = make_dimension(1, -1, -2);
  static const Dimension force = make_dimension(1, 1, -2);
  static const Dimension none = make_dimension(0, 0, 0);
  static const std::vector<UnitDefinition> table = {
      {"kg", 1.0, mass, 0}, {"g", 1e-3, mass, 0}, {"mg", 1e-6, mass, 0},
      {"t", 1e3, mass, 0}, {"tonne", 1e3, mass, 0}, {"lb", 0.45359237, mass, 0},
      {"m", 1.0, length, 0}, {"cm", 1e-2, length, 0}, {"mm", 1e-3, length, 0},
      {"um", 1e-6, length, 0}, {"km", 1e3, length, 0}, {"in", 0.0254, length, 0},
      {"ft", 0.3048, length, 0},
      {"ha", 1e4, area, 0},
      {"L", 1e-3, volume, 0}, {"l", 1e-3, volume, 0}, {"mL", 1e-6, volume, 0},
      {"ml", 1e-6, volume, 0}, {"gal", 3.785411784e-3, volume, 0},
      {"s", 1.0, time, 0}, {"min", 60.0, time, 0}, {"h", 3600.0, time, 0},
      {"d", 86400.0, time, 0}, {"day", 86400.0, time, 0}, {"week", 604800.0, time, 0},
      {"yr", 365.25 * 86400.0, time, 0},  // Julian year
      {"K", 1.0, temperature, 0}, {"degC", 1.0, temperature, 273.15},
      {"degF", 5.0 / 9.0, temperature, 459.67 * 5.0 / 9.0}, {"degR", 5.0 / 9.0, temperature, 0},
      {"mol", 1.0, amount, 0}, {"kmol", 1e3, amount, 0}, {"mmol", 1e-3, amount, 0},
      {"J", 1.0, energy, 0}, {"kJ", 1e3, energy, 0}, {"MJ", 1e6, energy, 0},
      {"GJ", 1e9, energy, 0}, {"Wh", 3600.0, energy, 0}, {"kWh", 3.6e6, energy, 0},
      {"MWh", 3.6e9, energy, 0}, {"cal", 4.184, energy, 0}, {"kcal", 4184.0, energy, 0},
      {"BTU", 1055.05585262, energy, 0},
      {"W", 1.0, power, 0}, {"kW", 1e3, power, 0}, {"MW", 1e6, power, 0},
      {"Pa", 1.0, pressure, 0}, {"kPa", 1e3, pressure, 0}, {"MPa", 1e6, pressure, 0},
      {"bar", 1e5, pressure, 0}, {"mbar", 1e2, pressure, 0}, {"atm", 101325.0, pressure, 0},
      {"mmHg", 133.322387415, pressure, 0}, {"torr", 101325.0 / 760.0, pressure, 0},
      {"psi", 6894.757293168, pressure, 0},
      {"N", 1.0, force, 0},
      {"%", 0.01, none, 0}, {"ppm", 1e-6, none, 0},
  };
  return table;
}

const UnitDefinition* find_unit(std::string_view symbol) {
  for (const auto& u : unit_table())
    if (u.symbol == symbol) return &u;
  return nullptr;
}

// "unknown unit ..." with what was expected and, when one is close, the
// symbol probably meant ("degQ" -> "degC").
std::string unknown_unit_message(std::string_view symbol, std::string_view expression) {
  std::vector<std::string> symbols;
  for (const auto& u : unit_table()) symbols.emplace_back(u.symbol);
  std::string suggestion = closest_match(symbol, symbols);
  // One letter off in a two-letter symbol is a guess, not a suggestion.
  if (!suggestion.empty() && edit_distance(symbol, suggestion) > std::max<std::size_t>(1, symbol.size() / 3))
    suggestion.clear();
  std::string message = "unknown unit \"" + std::string(symbol) +
                        "\" (expected a unit symbol such as K, degC, kPa, kg, kJ or h, listed in docs/quantities.md, "
                        "found \"" + std::string(expression) + "\")";
  if (!suggestion.empty()) message += " (did you mean \"" + suggestion + "\"?)";
  return message;
}

bool is_currency_code(std::string_view s) {
  if (s.size() != 3) return false;
  for (char c : s)
    if (c < 'A' || c > 'Z') return false;
  return true;
}

// A unit expression evaluated as a product: scale and dimension.
struct UnitValue {
  double scale = 1.0;
  Dimension dimension;
  std::string currency;
  int factor_count = 0;
  const UnitDefinition* lone = nullptr;  // set while the expression is one plain unit

  void multiply(const UnitValue& other, double power) {
    scale *= std::pow(other.scale, power);
    for (int i = 0; i < D::count; ++i) dimension.exponents[i] += other.dimension.exponents[i] * power;
    if (!other.currency.empty()) {
      if (!currency.empty() && currency != other.currency)
        throw UnitError("two currencies in one unit (" + currency + " and " + other.currency + ")");
      currency = other.currency;
    }
    factor_count += other.factor_count;
  }
};

class UnitExpressionParser {
 public:
  explicit UnitExpressionParser(std::string_view text) : text_(text) {}

  UnitValue parse() {
    UnitValue value = parse_product();
    skip_spaces();
    if (pos_ != text_.size())
      throw UnitError("unexpected '" + std::string(1, text_[pos_]) + "' in unit \"" +
                      std::string(text_) + "\"");
    return value;
  }

 private:
  std::string_view text_;
  std::size_t pos_ = 0;

  void skip_spaces() {
    while (pos_ < text_.size() && text_[pos_] == ' ') ++pos_;
  }
  bool at_end() const { return pos_ >= text_.size(); }
  char peek() const { return at_end() ? '\0' : text_[pos_]; }

  UnitValue parse_product() {
    UnitValue value;
    bool first = true;
    bool after_division = false;
    while (true) {
      skip_spaces();
      if (at_end() || peek() == ')') break;
      if (!first) {
        if (peek() == '/') {
          ++pos_;
          skip_spaces();
          UnitValue denominator = parse_factor();
          value.multiply(denominator, -1.0);
          value.lone = nullptr;
          after_division = true;
          continue;
        }
        if (peek() == '*') {
          ++pos_;
          skip_spaces();
        }
        if (after_division)
          throw UnitError("ambiguous unit \"" + std::string(text_) +
                          "\": after '/' group the denominator in parentheses, as in \"W/(m2 K)\"");
      }
      UnitValue factor = parse_factor();
      const bool single = first && factor.lone != nullptr;
      value.multiply(factor, 1.0);
      value.lone = single ? factor.lone : nullptr;
      first = false;
    }
    if (first) throw UnitError("empty unit in \"" + std::string(text_) + "\"");
    return value;
  }

  double parse_exponent() {
    if (peek() == '^') {
      ++pos_;
      const char* begin = text_.data() + pos_;
      char* end = nullptr;
      const std::string rest(begin, text_.size() - pos_);
      const double e = std::strtod(rest.c_str(), &end);
      const std::size_t used = static_cast<std::size_t>(end - rest.c_str());
      if (used == 0) throw UnitError("missing exponent after '^' in \"" + std::string(text_) + "\"");
      pos_ += used;
      return e;
    }
    std::size_t start = pos_;
    if (peek() == '-' && pos_ + 1 < text_.size() && std::isdigit(static_cast<unsigned char>(text_[pos_ + 1])))
      ++pos_;
    while (!at_end() && std::isdigit(static_cast<unsigned char>(peek()))) ++pos_;
    if (pos_ == start) return 1.0;
    return std::stod(std::string(text_.substr(start, pos_ - start)));
  }

  UnitValue parse_factor() {
    skip_spaces();
    if (peek() == '(') {
      ++pos_;
      UnitValue inner = parse_product();
      skip_spaces();
      if (peek() != ')') throw UnitError("missing ')' in unit \"" + std::string(text_) + "\"");
      ++pos_;
      const double power = parse_exponent();
      UnitValue out;
      out.multiply(inner, power);
      return out;
    }
    if (peek() == '1') {  // "1/K"
      ++pos_;
      UnitValue one;
      one.factor_count = 1;
      return one;
    }
    const std::size_t start = pos_;
    while (!at_end() && (std::isalpha(static_cast<unsigned char>(peek())) || peek() == '%')) ++pos_;
    const std::string_view symbol = text_.substr(start, pos_ - start);
    if (symbol.empty())
      throw UnitError("expected a unit symbol at '" + std::string(text_.substr(start)) + "' in \"" +
                      std::string(text_) + "\"");
    const double power = parse_exponent();
    UnitValue out;
    out.factor_count = 1;
    // Units first: "BTU" is a unit, not a currency code.
    const UnitDefinition* unit = find_unit(symbol);
    if (unit == nullptr && is_currency_code(symbol)) {
      out.dimension.exponents[D::money] = power;
      out.currency = std::string(symbol);
      return out;
    }
    if (unit == nullptr)
      throw UnitError(unknown_unit_message(symbol, text_));
    UnitValue base;
    base.scale = unit->scale;
    base.dimension = unit->dimension;
    out.multiply(base, power);
    out.factor_count = 1;
    out.lone = power == 1.0 ? unit : nullptr;
    return out;
  }
};

// Shortest form: "2", "0.5", "-1.5"; an exponent too large for an int
// (only a nonsense unit has one) in scientific notation rather than through
// an out-of-range conversion.
std::string format_exponent(double e) {
  if (e == std::floor(e) && std::abs(e) < 1e9) return std::to_string(static_cast<long long>(e));
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.6g", e);
  return buffer;
}

}  // namespace

bool operator==(const Dimension& a, const Dimension& b) {
  for (int i = 0; i < D::count; ++i)
    if (std::abs(a.exponents[i] - b.exponents[i]) > 1e-12) return false;
  return true;
}

bool Dimension::is_dimensionless() const { return *this == Dimension{}; }

std::string Dimension::describe() const {
  struct Named {
    Dimension d;
    const char* name;
  };
  static const Named named[] = {
      {make_dimension(0, 0, 0), "dimensionless"},
      {make_dimension(1, 0, 0), "mass (kg)"},
      {make_dimension(0, 1, 0), "length (m)"},
      {make_dimension(0, 2, 0), "area (m2)"},
      {make_dimension(0, 3, 0), "volume (m3)"},
      {make_dimension(0, 0, 1), "time (s)"},
      {make_dimension(0, 0, 0, 1), "temperature (K)"},
      {make_dimension(0, 0, 0, 0, 1), "amount of substance (mol)"},
      {make_dimension(1, 2, -2), "energy (J)"},
      {make_dimension(1, 2, -3), "power (W)"},
      {make_dimension(1, -1, -2), "pressure (Pa)"},
      {make_dimension(1, -3, 0), "density (kg/m3)"},
      {make_dimension(1, 0, -1), "mass flow (kg/s)"},
      {make_dimension(0, 3, -1), "volume flow (m3/s)"},
      {make_dimension(0, 2, -2), "specific energy (J/kg)"},
      {make_dimension(0, 2, -2, -1), "specific heat capacity (J/(kg K))"},
      {make_dimension(1, 2, -2, -1, -1), "molar heat capacity (J/(mol K))"},
      {make_dimension(1, 2, -2, 0, -1), "molar energy (J/mol)"},
      {make_dimension(1, 0, 0, 0, -1), "molar mass (kg/mol)"},
      {make_dimension(1, 0, -3, -1), "heat transfer coefficient (W/(m2 K))"},
      {make_dimension(1, 2, -3, -1), "thermal conductance (W/K)"},
      {make_dimension(0, 0, 0, -1), "inverse temperature (1/K)"},
      {make_dimension(0, 0, 0, 0, 0, 1), "money"},
      {make_dimension(-1, -2, 2, 0, 0, 1), "price per energy (money/J)"},
      {make_dimension(-1, 0, 0, 0, 0, 1), "price per mass (money/kg)"},
      {make_dimension(0, -3, 0, 0, 0, 1), "price per volume (money/m3)"},
      {make_dimension(0, 0, -1, 0, 0, 1), "money per time (money/s)"},
      {make_dimension(1, -0.5, -1), "square root of pressure (Pa^0.5)"},
  };
  for (const auto& n : named)
    if (n.d == *this) return n.name;
  static const char* symbols[] = {"kg", "m", "s", "K", "mol", "money"};
  std::string out;
  for (int i = 0; i < D::count; ++i) {
    if (exponents[i] == 0.0) continue;
    if (!out.empty()) out += ' ';
    out += symbols[i];
    if (exponents[i] != 1.0) out += "^" + format_exponent(exponents[i]);
  }
  return out;
}

ParsedQuantity parse_quantity(std::string_view text) {
  std::size_t begin = 0;
  while (begin < text.size() && std::isspace(static_cast<unsigned char>(text[begin]))) ++begin;
  std::size_t end = text.size();
  while (end > begin && std::isspace(static_cast<unsigned char>(text[end - 1]))) --end;
  const std::string_view trimmed = text.substr(begin, end - begin);
  if (trimmed.empty()) throw UnitError("empty value: expected a number and a unit");

  // from_chars does not accept a leading '+'; allow it as people write it.
  std::size_t number_start = trimmed.front() == '+' ? 1 : 0;
  double number = 0.0;
  const char* first = trimmed.data() + number_start;
  const char* last = trimmed.data() + trimmed.size();
  auto [ptr, ec] = std::from_chars(first, last, number);
  if (ec == std::errc::result_out_of_range)
    throw UnitError("the number in \"" + std::string(trimmed) + "\" is out of range (expected a finite number)");
  const std::string_view written = trimmed.substr(number_start);
  for (std::string_view special : {".inf", "-.inf", ".Inf", ".INF", ".nan", ".NaN", ".NAN", "inf", "nan"})
    if (written.substr(0, special.size()) == special)
      throw UnitError("the number in \"" + std::string(trimmed) + "\" is not finite (expected a finite number)");
  if (ec != std::errc() || ptr == first)
    throw UnitError("missing number in \"" + std::string(trimmed) + "\": expected a number and a unit");
  if (!std::isfinite(number))
    throw UnitError("the number in \"" + std::string(trimmed) + "\" is not finite");

  ParsedQuantity out;
  out.number = number;
  std::string_view unit_text = trimmed.substr(static_cast<std::size_t>(ptr - trimmed.data()));
  while (!unit_text.empty() && unit_text.front() == ' ') unit_text.remove_prefix(1);
  out.unit_text = std::string(unit_text);
  if (unit_text.empty()) return out;  // dimensionless

  UnitValue value = UnitExpressionParser(unit_text).parse();
  out.scale = value.scale;
  out.dimension = value.dimension;
  out.currency = value.currency;
  if (value.lone != nullptr && value.lone->dimension == make_dimension(0, 0, 0, 1)) {
    out.lone_temperature_unit = true;
    out.absolute_offset_K = value.lone->absolute_offset_K;
  }
  return out;
}

namespace detail {

void check_dimension(const ParsedQuantity& parsed, const Dimension& expected) {
  if (parsed.dimension == expected) return;
  std::string found = parsed.dimension.describe();
  if (!parsed.unit_text.empty()) found += " from unit \"" + parsed.unit_text + "\"";
  else found += " (a bare number)";
  throw UnitError("wrong dimension (expected " + expected.describe() + ", found " + found + ")");
}

double checked_temperature(const ParsedQuantity& parsed) {
  if (!parsed.lone_temperature_unit)
    throw UnitError("an absolute temperature needs a lone temperature unit (K, degC, degF), found \"" +
                    parsed.unit_text + "\"");
  const double kelvin_value = parsed.number * parsed.scale + parsed.absolute_offset_K;
  if (kelvin_value < 0.0)
    throw UnitError("temperature below absolute zero (expected at least 0 K, found " +
                    std::to_string(kelvin_value) + " K)");
  return kelvin_value;
}

void check_currency(const ParsedQuantity& parsed, std::string_view expected_currency) {
  if (expected_currency.empty() || parsed.currency == expected_currency) return;
  throw UnitError("wrong currency (expected " + std::string(expected_currency) + ", found " +
                  parsed.currency + "); unchain never converts between currencies");
}

}  // namespace detail

}  // namespace unchain
