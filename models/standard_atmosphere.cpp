#include "models/standard_atmosphere.hpp"

#include <algorithm>
#include <cmath>

namespace hawser {

namespace {
constexpr double kGmr = StandardAtmosphere1976::kG0 * StandardAtmosphere1976::kMolarMass /
                        StandardAtmosphere1976::kGasConstant;  // g0' M0 / R* [K/m']
}  // namespace

StandardAtmosphere1976::StandardAtmosphere1976()
    : base_h_{0.0, 11000.0, 20000.0, 32000.0, 47000.0, 51000.0, 71000.0, 84852.0},
      base_t_{},
      base_p_{},
      lapse_{-6.5e-3, 0.0, 1.0e-3, 2.8e-3, 0.0, -2.8e-3, -2.0e-3} {
  // Base temperatures and pressures follow from T_0, P_0 and the lapse rates, layer by layer,
  // exactly as the standard defines them.
  base_t_[0] = 288.15;
  base_p_[0] = kSeaLevelPressure;
  for (int b = 0; b < kLayers; ++b) {
    const AtmosphereState top = in_layer(b, base_h_[b + 1]);
    base_t_[b + 1] = top.temperature_k;
    base_p_[b + 1] = top.pressure_pa;
  }
}

double StandardAtmosphere1976::geopotential_altitude(double z_m) {
  return kEarthRadius * z_m / (kEarthRadius + z_m);
}

AtmosphereState StandardAtmosphere1976::in_layer(int b, double h) const {
  const double dh = h - base_h_[b];
  const double tb = base_t_[b], lb = lapse_[b];
  const double t = tb + lb * dh;
  const double p = lb == 0.0 ? base_p_[b] * std::exp(-kGmr * dh / tb)
                             : base_p_[b] * std::pow(tb / t, kGmr / lb);
  return {t, p, p * kMolarMass / (kGasConstant * t)};
}

AtmosphereState StandardAtmosphere1976::at(double z_m) const {
  const double h = geopotential_altitude(std::max(z_m, kLowestAltitude));
  if (h >= base_h_[kLayers]) {
    // Isothermal continuation above 84.852 km' (see the header): scale height R* T_7 / (g0' M0).
    const double t = base_t_[kLayers];
    const double p = base_p_[kLayers] * std::exp(-kGmr * (h - base_h_[kLayers]) / t);
    return {t, p, p * kMolarMass / (kGasConstant * t)};
  }
  // Layer containing h; negative h extrapolates layer 0.
  int b = kLayers - 1;
  while (b > 0 && h < base_h_[b]) --b;
  return in_layer(b, h);
}

}  // namespace hawser
