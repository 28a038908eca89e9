// The flash at a given duty: the outlet temperature at which the flashed
// outlet's enthalpy equals the feed's plus the duty.

#include <algorithm>
#include <cmath>
#include <sstream>

#include "flowsheet/diagnostics.hpp"
#include "flowsheet/thermo/phase_equilibrium.hpp"
#include "flowsheet/thermo/vle_support.hpp"

namespace unchain {

Stream flash_stream_at_duty(const Stream& feed, Energy duty, Pressure P, Warnings* warnings) {
  const double duty_J = to_si(duty);
  std::ostringstream what_text;
  what_text.precision(6);
  what_text << "outlet temperature of a flash taking up a duty of " << duty_J << " J";
  const std::string what = what_text.str();
  if (!feed.has_components() || feed.is_empty()) {
    if (duty_J == 0.0) {
      Stream out = feed;
      out.set_pressure(P);
      return out;
    }
    throw ModelError(what + ": the feed is empty, so no temperature takes up a duty");
  }

  const double target_J = to_si(feed.enthalpy(warnings)) + duty_J;
  // H_out(T) increases with T: sensible heat and vaporization both take up
  // heat. Its only jumps are upward, at the boiling point of a pure fluid
  // (or an azeotrope), where liquid turns wholly to vapour.
  auto residual = [&](double T_K) {
    return to_si(flash_stream(feed, kelvin(T_K), P, nullptr).enthalpy(nullptr)) - target_J;
  };
  // Start next to the feed temperature: most duties move it little, and the
  // heat-capacity polynomials are then used near where they were fitted.
  const double start_K = std::clamp(in_kelvin(feed.temperature()), vle::lowest_search_temperature_K,
                                    vle::highest_search_temperature_K);
  const vle::Bracket root = vle::increasing_temperature_root(residual, start_K - 1.0, start_K + 1.0, what);

  // The bracket is about 1e-13 K wide. Mixing its two ends' outlets in the
  // proportion that meets the target closes the energy balance exactly,
  // and at a jump (a pure fluid boiling) gives the partly vaporized outlet
  // that no single temperature of the search can.
  if (root.high <= root.low) return flash_stream(feed, kelvin(root.low), P, warnings);  // an exact hit
  const Stream at_low = flash_stream(feed, kelvin(root.low), P, nullptr);
  const Stream at_high = flash_stream(feed, kelvin(root.high), P, nullptr);
  const double H_low = to_si(at_low.enthalpy(nullptr));
  const double H_high = to_si(at_high.enthalpy(nullptr));
  const double share_of_high = H_high > H_low ? std::clamp((target_J - H_low) / (H_high - H_low), 0.0, 1.0) : 0.0;
  Stream out = at_low.scaled(1.0 - share_of_high);
  out.add_contents(at_high.scaled(share_of_high));
  const double T_out = root.low + share_of_high * (root.high - root.low);
  out.set_temperature(kelvin(T_out));
  out.set_pressure(P);
  if (warnings != nullptr) {  // the answer's correlations, once, with the sink
    (void)flash_stream(feed, kelvin(T_out), P, warnings);
    (void)out.enthalpy(warnings);
  }
  return out;
}

}  // namespace unchain
