// NRTL activity coefficients.

#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "flowsheet/component_library.hpp"
#include "flowsheet/diagnostics.hpp"
#include "flowsheet/thermo/activity.hpp"

namespace {

using namespace unchain;

Component test_component(const std::string& id, ComponentKind kind) {
  Component c;
  c.id = id;
  c.name = id;
  c.kind = kind;
  c.molar_mass = 0.1;
  return c;
}

// An invented, strongly non-ideal pair (invented parameters, not data).
NrtlPair invented_pair(const std::string& first, const std::string& second) {
  NrtlPair p;
  p.first = first;
  p.second = second;
  p.a12 = 0.5;
  p.a21 = 1.2;
  p.b12 = 100.0;
  p.b21 = -50.0;
  p.alpha = 0.3;
  p.range = {280.0, 380.0};
  p.source = "invented for a test";
  return p;
}

ComponentSet invented_set() {
  std::vector<Component> components{test_component("one", ComponentKind::volatile_liquid),
                                     test_component("two", ComponentKind::volatile_liquid),
                                     test_component("three", ComponentKind::volatile_liquid),
                                     test_component("resin", ComponentKind::polymer)};
  return ComponentSet(std::move(components), {invented_pair("one", "two")}, {});
}

// Binary NRTL written out by hand.
// Source: Renon and Prausnitz, AIChE J. 14 (1968) 135, binary form of the
// excess Gibbs energy (as in Poling, Prausnitz and O'Connell, The
// Properties of Gases and Liquids, 5th ed., table 8-3; from memory).
std::pair<double, double> binary_nrtl(double x1, double T) {
  const double t12 = 0.5 + 100.0 / T, t21 = 1.2 - 50.0 / T;
  const double G12 = std::exp(-0.3 * t12), G21 = std::exp(-0.3 * t21);
  const double x2 = 1.0 - x1;
  const double ln1 = x2 * x2 * (t21 * std::pow(G21 / (x1 + x2 * G21), 2) + t12 * G12 / std::pow(x2 + x1 * G12, 2));
  const double ln2 = x1 * x1 * (t12 * std::pow(G12 / (x2 + x1 * G12), 2) + t21 * G21 / std::pow(x1 + x2 * G21, 2));
  return {std::exp(ln1), std::exp(ln2)};
}

Eigen::VectorXd fractions(std::initializer_list<double> values) {
  Eigen::VectorXd v(static_cast<Eigen::Index>(values.size()));
  Eigen::Index i = 0;
  for (double value : values) v[i++] = value;
  return v;
}

}  // namespace

TEST_CASE("activity: multicomponent NRTL reduces to the binary form") {
  const ComponentSet set = invented_set();
  const double T = 330.0;
  for (double x1 : {0.0, 0.1, 0.5, 0.9, 1.0}) {
    const auto [g1, g2] = binary_nrtl(x1, T);
    const Eigen::VectorXd gamma = activity_coefficients(set, fractions({x1, 1.0 - x1, 0.0, 0.0}), kelvin(T));
    CAPTURE(x1);
    CHECK(gamma[0] == doctest::Approx(g1).epsilon(1e-12));
    CHECK(gamma[1] == doctest::Approx(g2).epsilon(1e-12));
  }
}

TEST_CASE("activity: pure-component limit and ideal pairs") {
  const ComponentSet set = invented_set();
  const Eigen::VectorXd pure_one = activity_coefficients(set, fractions({1.0, 0.0, 0.0, 0.0}), kelvin(330.0));
  CHECK(pure_one[0] == doctest::Approx(1.0).epsilon(1e-14));
  CHECK(pure_one[1] > 1.0);  // infinite dilution in a positive-deviation pair
  // "three" has no parameters with anyone: an equimolar mix of one and
  // three is ideal, whatever the temperature.
  const Eigen::VectorXd ideal = activity_coefficients(set, fractions({0.5, 0.0, 0.5, 0.0}), kelvin(300.0));
  CHECK(ideal[0] == doctest::Approx(1.0).epsilon(1e-14));
  CHECK(ideal[2] == doctest::Approx(1.0).epsilon(1e-14));
}

TEST_CASE("activity: Gibbs-Duhem holds for the ternary") {
  // sum_i x_i d ln gamma_i = 0 along any composition path at fixed T
  // (thermodynamic consistency; common practice). Central differences,
  // truncation error about 1e-8.
  const ComponentSet set = invented_set();
  const double T = 340.0;
  const Eigen::VectorXd x = fractions({0.3, 0.5, 0.2, 0.0});
  const Eigen::VectorXd direction = fractions({0.2, -0.1, -0.1, 0.0});  // sums to zero
  const double h = 1e-5;
  const Eigen::VectorXd up = activity_coefficients(set, x + h * direction, kelvin(T)).array().log();
  const Eigen::VectorXd down = activity_coefficients(set, x - h * direction, kelvin(T)).array().log();
  const double gibbs_duhem = x.dot((up - down) / (2.0 * h));
  const double scale = ((up - down) / (2.0 * h)).cwiseAbs().maxCoeff();
  CHECK(scale > 0.1);  // the path does change the coefficients
  CHECK(std::abs(gibbs_duhem) < 1e-7);
}

TEST_CASE("activity: polymers are left out of the liquid mixture") {
  const ComponentSet set = invented_set();
  const Eigen::VectorXd without = activity_coefficients(set, fractions({0.2, 0.6, 0.2, 0.0}), kelvin(330.0));
  // The same liquid with polymer: renormalised over the fluids first.
  const Eigen::VectorXd with = activity_coefficients(set, fractions({0.1, 0.3, 0.1, 0.5}), kelvin(330.0));
  for (Eigen::Index i = 0; i < 3; ++i) CHECK(with[i] == doctest::Approx(without[i]).epsilon(1e-14));
  CHECK(with[3] == 1.0);
}

TEST_CASE("activity: warns when a pair is used outside its temperature range") {
  const ComponentSet set = invented_set();
  Warnings inside, outside;
  (void)activity_coefficients(set, fractions({0.5, 0.5, 0.0, 0.0}), kelvin(330.0), &inside);
  (void)activity_coefficients(set, fractions({0.5, 0.5, 0.0, 0.0}), kelvin(420.0), &outside);
  (void)activity_coefficients(set, fractions({0.5, 0.5, 0.0, 0.0}), kelvin(425.0), &outside);
  CHECK(inside.size() == 0);
  REQUIRE(outside.size() == 1);  // one message however often the point is passed
  CHECK(outside.messages()[0].find("one-two") != std::string::npos);
  CHECK(outside.messages()[0].find("above") != std::string::npos);
}

TEST_CASE("activity: acetone-water warnings from the data file's pair") {
  DiagnosticList diagnostics;
  const ComponentSet set = make_component_set(builtin_library(), {"acetone", "water", "styrene"}, {}, diagnostics);
  diagnostics.throw_if_errors();
  REQUIRE(set.nrtl_pairs().size() == 1);
  const double low = set.nrtl_pairs()[0].range.low_K;
  Warnings inside, below;
  (void)activity_coefficients(set, fractions({0.5, 0.5, 0.0}), kelvin(low + 5.0), &inside);
  (void)activity_coefficients(set, fractions({0.5, 0.5, 0.0}), kelvin(low - 20.0), &below);
  CHECK(inside.size() == 0);
  REQUIRE(below.size() == 1);
  CHECK(below.messages()[0].find("below") != std::string::npos);
  // Water with styrene and no pair: ideal, with a warning that the two
  // really form two liquids (styrene dissolves to about 0.03 wt % in water).
  Warnings split;
  const Eigen::VectorXd gamma = activity_coefficients(set, fractions({0.0, 0.5, 0.5}), kelvin(330.0), &split);
  CHECK(gamma[1] == doctest::Approx(1.0).epsilon(1e-14));
  CHECK(gamma[2] == doctest::Approx(1.0).epsilon(1e-14));
  REQUIRE(split.size() == 1);
  CHECK(split.messages()[0].find("immiscible") != std::string::npos);
}
