// The shared vessel heat-up and heat-loss model (units/vessel_heating).

#include <doctest/doctest.h>

#include <yaml-cpp/yaml.h>

#include <boost/numeric/odeint.hpp>

#include <cmath>
#include <numbers>
#include <string>
#include <vector>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/yaml_reader.hpp"
#include "units/vessel_heating.hpp"

using namespace unchain;
using namespace unchain::units;

namespace {

HeatCapacity joules_per_kelvin(double value) { return from_si<HeatCapacity>(value); }
Power watts(double value) { return from_si<Power>(value); }
ThermalConductance watts_per_kelvin(double value) { return from_si<ThermalConductance>(value); }

VesselDesign design_with(double P_W, double area_m2, double U, double vessel_J_per_K) {
  VesselDesign d;
  d.heater_power = watts(P_W);
  d.outer_area = from_si<Area>(area_m2);
  d.loss_coefficient = from_si<HeatTransferCoefficient>(U);
  d.insulation = Insulation::given_coefficient;
  d.vessel_heat_capacity = joules_per_kelvin(vessel_J_per_K);
  return d;
}

struct ReadDesign {
  DiagnosticList diagnostics;
  VesselDesign design;
};

ReadDesign read_design(const std::string& yaml) {
  ReadDesign r;
  MappingReader parameters(YAML::Load(yaml), "test.yaml", "blocks.dryer", r.diagnostics);
  r.design = read_vessel_design(parameters);
  parameters.finish();
  return r;
}

bool has_error(const DiagnosticList& list, const std::string& text) {
  for (const auto& d : list.all())
    if (d.severity == Severity::error && d.message.find(text) != std::string::npos) return true;
  return false;
}

}  // namespace

TEST_CASE("heat-up time matches the analytic solution of the lumped heat balance") {
  // Hand calculation: C = 10 kJ/K, P = 1000 W, UA = 2 W/K, T_0 = T_a = 20 degC,
  // T_set = 120 degC. P/UA = 500 K, so
  //   t = (C/UA) ln(500 / (500 - 100)) = 5000 s x ln(1.25) = 1115.7178 s.
  const Time t = lumped_heat_up_time(joules_per_kelvin(10e3), watts(1000.0), watts_per_kelvin(2.0), celsius(20.0),
                                     celsius(120.0), celsius(20.0));
  CHECK(to_si(t) == doctest::Approx(5000.0 * std::log(1.25)).epsilon(1e-12));
  CHECK(to_si(t) == doctest::Approx(1115.7178).epsilon(1e-7));

  // Start below ambient: T_0 = 5 degC, T_a = 25 degC, T_set = 80 degC,
  // C = 3 kJ/K, P = 250 W, UA = 1.5 W/K: P/UA = 166.667 K,
  //   t = 2000 s x ln((166.667 + 20) / (166.667 - 55)) = 2000 ln(1.67164) = 1027.62 s.
  const Time t2 = lumped_heat_up_time(joules_per_kelvin(3e3), watts(250.0), watts_per_kelvin(1.5), celsius(5.0),
                                      celsius(80.0), celsius(25.0));
  CHECK(to_si(t2) == doctest::Approx(2000.0 * std::log((250.0 / 1.5 + 20.0) / (250.0 / 1.5 - 55.0))).epsilon(1e-12));
  CHECK(to_si(t2) == doctest::Approx(1027.62).epsilon(1e-5));

  // Without losses the time tends to C dT / P (UA -> 0): 10 kJ/K x 100 K / 1 kW = 1000 s.
  const Time t3 = lumped_heat_up_time(joules_per_kelvin(10e3), watts(1000.0), watts_per_kelvin(1e-9), celsius(20.0),
                                      celsius(120.0), celsius(20.0));
  CHECK(to_si(t3) == doctest::Approx(1000.0).epsilon(1e-9));

  // A charge already at or above its set-point needs no heat-up.
  CHECK(to_si(lumped_heat_up_time(joules_per_kelvin(1e3), watts(100.0), watts_per_kelvin(1.0), celsius(90.0),
                                  celsius(80.0), celsius(20.0))) == 0.0);
}

TEST_CASE("heat-up time agrees with a numerical integration (Boost.Odeint)") {
  // dT/dt = (P - UA (T - T_a)) / C integrated with an adaptive Dormand-Prince
  // stepper from T_0 up to the analytic heat-up time must end at T_set.
  const double C = 25e3, P = 1500.0, UA = 4.2, Ta = 293.15, T0 = 288.15, Tset = 423.15;
  const double t_analytic = to_si(lumped_heat_up_time(joules_per_kelvin(C), watts(P), watts_per_kelvin(UA),
                                                      kelvin(T0), kelvin(Tset), kelvin(Ta)));
  using state = std::vector<double>;
  auto rhs = [&](const state& T, state& dTdt, double) { dTdt[0] = (P - UA * (T[0] - Ta)) / C; };
  state T{T0};
  namespace odeint = boost::numeric::odeint;
  odeint::integrate_adaptive(odeint::make_controlled<odeint::runge_kutta_dopri5<state>>(1e-12, 1e-12), rhs, T, 0.0,
                             t_analytic, 1.0);
  // The integrator's tolerance is 1e-12 relative; 1e-7 K leaves a wide margin.
  CHECK(T[0] == doctest::Approx(Tset).epsilon(1e-9));

  // And the closed-form temperature curve along the way.
  for (double t : {60.0, 600.0, 0.5 * t_analytic}) {
    state Tt{T0};
    odeint::integrate_adaptive(odeint::make_controlled<odeint::runge_kutta_dopri5<state>>(1e-12, 1e-12), rhs, Tt,
                               0.0, t, 1.0);
    const double closed = in_kelvin(
        lumped_temperature_at(joules_per_kelvin(C), watts(P), watts_per_kelvin(UA), kelvin(T0), kelvin(Ta), seconds(t)));
    CAPTURE(t);
    CHECK(closed == doctest::Approx(Tt[0]).epsilon(1e-9));
  }
}

TEST_CASE("a heater that cannot reach its set-point is refused with the numbers") {
  // 150 W against UA = 2 W/K: the charge levels off at 20 + 150/2 = 95 degC;
  // holding 120 degC needs more than 2 x 100 = 200 W.
  std::string message;
  try {
    (void)lumped_heat_up_time(joules_per_kelvin(5e3), watts(150.0), watts_per_kelvin(2.0), celsius(20.0),
                              celsius(120.0), celsius(20.0));
  } catch (const ModelError& e) {
    message = e.what();
  }
  CAPTURE(message);
  CHECK(message.find("cannot reach its set-point of 120.0 degC") != std::string::npos);
  CHECK(message.find("95.0 degC") != std::string::npos);
  CHECK(message.find("200 W") != std::string::npos);

  // The same through the batch model and the continuous one.
  VesselCharge charge;
  charge.start = celsius(20.0);
  charge.set_point = celsius(120.0);
  charge.ambient = celsius(20.0);
  CHECK_THROWS_AS(heat_vessel(design_with(150.0, 0.2, 10.0, 0.0), charge), ModelError);
  // Continuous: 50 W into the streams plus 200 W wall loss = 250 W > 220 W.
  CHECK_THROWS_AS(heat_vessel_steadily(design_with(220.0, 0.2, 10.0, 0.0), watts(50.0), celsius(120.0), celsius(20.0)),
                  ModelError);
  const SteadyHeatingResult steady =
      heat_vessel_steadily(design_with(300.0, 0.2, 10.0, 0.0), watts(50.0), celsius(120.0), celsius(20.0));
  CHECK(to_si(steady.power_drawn) == doctest::Approx(250.0).epsilon(1e-12));
}

TEST_CASE("batch heating: time at set-point and the energy drawn") {
  // Vessel: UA = 0.5 m2 x 10 W/(m2 K) = 5 W/K, 2 kW heater, vessel 1.67 kJ/K.
  // Charge 8.33 kJ/K from 20 to 100 degC at 20 degC ambient, hold 30 min,
  // 1.8 MJ of vaporization at the set-point.
  //   C = 10 kJ/K, P/UA = 400 K: t_heat = 2000 s x ln(400/320) = 446.287 s
  //   loss at set-point = 5 x 80 = 400 W; Q / (P - loss) = 1.8e6 / 1600 = 1125 s
  //   t_set = max(1800, 1125) = 1800 s
  //   drawn = 2000 x 446.287 + 400 x 1800 + 1.8e6 = 3.41257 MJ
  const VesselDesign d = design_with(2000.0, 0.5, 10.0, 1670.0);
  VesselCharge charge;
  charge.charge_heat_capacity = joules_per_kelvin(8330.0);
  charge.start = celsius(20.0);
  charge.set_point = celsius(100.0);
  charge.ambient = celsius(20.0);
  charge.hold_time = seconds(1800.0);
  charge.process_heat_at_set_point = joules(1.8e6);
  const VesselHeatingResult r = heat_vessel(d, charge);
  const double t_heat = 2000.0 * std::log(400.0 / 320.0);
  CHECK(to_si(r.heat_up_time) == doctest::Approx(t_heat).epsilon(1e-12));
  CHECK(to_si(r.hold_time) == doctest::Approx(1800.0).epsilon(1e-12));
  CHECK(to_si(r.energy_drawn) == doctest::Approx(2000.0 * t_heat + 400.0 * 1800.0 + 1.8e6).epsilon(1e-12));
  CHECK(to_si(r.energy_to_charge) == doctest::Approx(8330.0 * 80.0).epsilon(1e-12));
  CHECK(to_si(r.energy_to_vessel) == doctest::Approx(1670.0 * 80.0).epsilon(1e-12));
  // Everything drawn goes somewhere: charge, vessel, process or the wall.
  CHECK(to_si(r.energy_drawn) == doctest::Approx(to_si(r.energy_to_charge) + to_si(r.energy_to_vessel) +
                                                 to_si(r.energy_to_process) + to_si(r.energy_lost))
                                     .epsilon(1e-12));
  CHECK(in_kelvin(r.max_reachable_temperature) == doctest::Approx(293.15 + 400.0).epsilon(1e-12));
  CHECK(to_si(r.loss_conductance) == doctest::Approx(5.0).epsilon(1e-12));

  // With a short hold, evaporation at the spare power sets the time: 1125 s.
  charge.hold_time = seconds(600.0);
  CHECK(to_si(heat_vessel(d, charge).hold_time) == doctest::Approx(1125.0).epsilon(1e-12));
}

TEST_CASE("outer area of the 1.5-diameter cylinder and the insulation coefficients") {
  // 20 L: D = (0.02 / (0.375 pi))^(1/3) = 0.257010 m; area = pi D H + 2 pi D^2 / 4
  // with H = 1.5 D, i.e. 2 pi D^2 = 0.415030 m2.
  const double D = std::cbrt(0.02 / (0.375 * std::numbers::pi));
  CHECK(std::numbers::pi / 4.0 * D * D * 1.5 * D == doctest::Approx(0.02).epsilon(1e-12));
  const double area = std::numbers::pi * D * 1.5 * D + 2.0 * std::numbers::pi * D * D / 4.0;
  CHECK(to_si(cylinder_outer_area(from_si<Volume>(0.02))) == doctest::Approx(area).epsilon(1e-12));
  CHECK(area == doctest::Approx(0.415030).epsilon(1e-5));

  // Mineral wool 50 mm, k = 0.04 W/(m K), outer film 8 W/(m2 K):
  //   U = 1 / (0.05/0.04 + 1/8) = 1 / 1.375 = 0.727273 W/(m2 K).
  CHECK(to_si(insulation_loss_coefficient(Insulation::mineral_wool, from_si<Length>(0.05))) ==
        doctest::Approx(1.0 / 1.375).epsilon(1e-12));
  // Common practice: bare hot glass 10-15 W/(m2 K), a foil wrap less.
  const double bare = to_si(insulation_loss_coefficient(Insulation::bare_glass, from_si<Length>(0.0)));
  const double foil = to_si(insulation_loss_coefficient(Insulation::foil_wrap, from_si<Length>(0.0)));
  CHECK(bare >= 10.0);
  CHECK(bare <= 15.0);
  CHECK(foil < bare);
}

TEST_CASE("vessel parameters are read from the block mapping") {
  const ReadDesign r = read_design(
      "heater_power: \"1.2 kW\"\nvessel_volume: \"20 L\"\nvessel_mass: \"2 kg\"\nvessel_material: stainless\n"
      "insulation: mineral_wool\ninsulation_thickness: \"25 mm\"\n");
  for (const auto& d : r.diagnostics.all()) INFO(d.to_string());
  REQUIRE_FALSE(r.diagnostics.has_errors());
  CHECK(to_si(r.design.heater_power) == doctest::Approx(1200.0));
  CHECK(to_si(r.design.outer_area) == doctest::Approx(0.415030).epsilon(1e-5));
  // Source: Incropera and DeWitt, Table A.1, AISI 304 cp = 477 J/(kg K) at 300 K (from memory).
  CHECK(to_si(r.design.vessel_heat_capacity) == doctest::Approx(2.0 * 477.0));
  CHECK(to_si(r.design.loss_coefficient) == doctest::Approx(1.0 / (0.025 / 0.04 + 1.0 / 8.0)).epsilon(1e-12));

  const ReadDesign given = read_design(
      "heater_power: \"500 W\"\nouter_area: \"0.3 m2\"\nvessel_heat_capacity: \"2 kJ/K\"\n"
      "heat_loss_coefficient: \"4 W/(m2 K)\"\n");
  REQUIRE_FALSE(given.diagnostics.has_errors());
  CHECK(to_si(given.design.loss_conductance()) == doctest::Approx(1.2));
  CHECK(to_si(given.design.vessel_heat_capacity) == doctest::Approx(2000.0));

  const ReadDesign both = read_design(
      "heater_power: \"500 W\"\nouter_area: \"0.3 m2\"\nvessel_volume: \"5 L\"\nvessel_mass: \"1 kg\"\n"
      "insulation: mineral_woll\n");
  CHECK(has_error(both.diagnostics, "not both"));
  CHECK(has_error(both.diagnostics, "did you mean 'mineral_wool'"));

  const ReadDesign missing = read_design("vessel_volume: \"5 L\"\n");
  CHECK(has_error(missing.diagnostics, "heater_power"));
  CHECK(has_error(missing.diagnostics, "vessel_mass"));
}
