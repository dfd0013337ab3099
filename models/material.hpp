#pragma once
// A tether material: the properties the bar elements need. Values in SI.
#include <string>

namespace hawser {

struct Material {
  std::string name;
  double density_kg_m3 = 0.0;        // rho_m [kg/m^3]
  double youngs_modulus_pa = 0.0;    // E [Pa]
  double ultimate_strength_pa = 0.0; // sigma_u [Pa]
  /// Kelvin-Voigt retardation time tau [s]: damping stress = tau * E * strain rate.
  /// 0 means no internal damping. A mode of angular frequency w then has damping ratio w tau / 2.
  double damping_time_s = 0.0;
  std::string source;                // where the values come from (tables), or "inline"
};

}  // namespace hawser
