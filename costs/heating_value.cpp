#include "costs/heating_value.hpp"

namespace unchain::costs {

Energy lower_heating_value(const Stream& stream, Warnings* warnings) {
  Stream at_reference = stream;
  at_reference.set_temperature(kelvin(reference_temperature_K));
  const double reactants = to_si(at_reference.enthalpy(warnings));
  double products = 0.0;
  const Eigen::VectorXd moles = stream.component_moles();
  for (std::size_t i = 0; i < stream.size(); ++i) {
    const auto& formula = stream.components()[i].formula;
    const double n = moles[static_cast<Eigen::Index>(i)];
    if (auto c = formula.find("C"); c != formula.end()) products += n * c->second * formation_enthalpy_co2_J_per_mol;
    if (auto h = formula.find("H"); h != formula.end())
      products += n * h->second / 2.0 * formation_enthalpy_water_vapour_J_per_mol;
  }
  return joules(reactants - products);
}

}  // namespace unchain::costs
