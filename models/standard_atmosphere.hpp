#pragma once
// The U.S. Standard Atmosphere, 1976 (NOAA, NASA, USAF; U.S. Government Printing Office,
// Washington D.C., 1976), lower part: 0 to 86 km geometric altitude, plus a stated extension.
//
// Geopotential altitude H [m'] from geometric altitude z [m]:
//   H = r0 z / (r0 + z),   r0 = 6356.766 km (the standard's effective Earth radius, a constant
//   of the standard, not the planet's equatorial radius).
// Seven layers b = 0..6 with base H_b, molecular-scale temperature T_b and lapse rate L_b
// (the standard's table of layer constants; values recalled from memory and consistent with
// every density the tests compare against):
//   H_b [km']  0      11      20      32      47      51      71      (84.852 top)
//   L_b [K/km'] -6.5  0.0     +1.0    +2.8    0.0     -2.8    -2.0
//   T_b [K]    288.15 216.65  216.65  228.65  270.65  270.65  214.65  (186.946)
// Temperature T_M = T_b + L_b (H - H_b); pressure from the hydrostatic equation with the
// ideal gas law, integrated in each layer:
//   P = P_b [T_b / T_M]^(g0' M0 / (R* L_b))              for L_b != 0
//   P = P_b exp(-g0' M0 (H - H_b) / (R* T_b))            for L_b == 0
// with P_0 = 101325 Pa and every P_b (b > 0) the top of the layer below, computed here;
// density from the ideal gas law rho = P M0 / (R* T_M) (M/T = M0/T_M by definition of T_M).
// Constants of the standard: R* = 8314.32 J/(kmol K), M0 = 28.9644 kg/kmol,
// g0' = 9.80665 m^2/(s^2 m').
//
// Reported temperature: the molecular-scale temperature T_M. It equals the kinetic temperature
// below 80 km; between 80 and 86 km the kinetic temperature is T_M M/M0 with M/M0 falling to
// 0.999579 at 86 km (the standard, recalled from memory), i.e. at most 0.05 % lower.
// Pressure and density are those of the standard at all altitudes up to 86 km.
//
// Outside the standard's lower atmosphere (documented choices, not the standard):
//  - Below 0 km the first layer is extrapolated down to -5 km (the standard's tables start
//    at -5 km); below -5 km the state is held at its -5 km value (clamped).
//  - Above 86 km (H = 84.852 km') the last layer's top is continued as an isothermal layer at
//    T_M = 186.946 K in geopotential altitude: P = P_7 exp(-(H - H_7) / H_s),
//    H_s = R* T_7 / (g0' M0) = 5.47 km'. This is an engineering approximation: it is within a
//    few per cent of the standard at 100 km, but above about 110 km the real thermosphere is
//    hotter and its density is higher (the standard gives 2.076e-9 kg/m^3 at 150 km, recalled
//    from memory; this model 9e-11). Either value makes the aerodynamic load on a
//    tether there negligible (dynamic pressure of a 100 m/s wind: below 1e-5 Pa). The density
//    falls monotonically and reaches 0 (underflow) well below geostationary altitude.
#include <array>

namespace hawser {

struct AtmosphereState {
  double temperature_k;   // molecular-scale temperature T_M [K] (see above)
  double pressure_pa;     // [Pa]
  double density_kg_m3;   // [kg/m^3]
};

class StandardAtmosphere1976 {
 public:
  StandardAtmosphere1976();
  /// State at a geometric altitude above the surface [m].
  AtmosphereState at(double geometric_altitude_m) const;
  /// The standard's geopotential altitude H [m'] of a geometric altitude z [m].
  static double geopotential_altitude(double geometric_altitude_m);

  // Constants of the standard (values above).
  static constexpr double kGasConstant = 8314.32;      // R* [J/(kmol K)]
  static constexpr double kMolarMass = 28.9644;        // M0 [kg/kmol]
  static constexpr double kG0 = 9.80665;               // g0' [m^2/(s^2 m')]
  static constexpr double kEarthRadius = 6356766.0;    // r0 [m]
  static constexpr double kSeaLevelPressure = 101325.0;  // P_0 [Pa]
  static constexpr double kLowestAltitude = -5000.0;   // tables start here [m]
  static constexpr int kLayers = 7;

 private:
  // Layer b: base geopotential altitude [m'], lapse rate [K/m'], base temperature [K] and
  // base pressure [Pa]; index kLayers is the top of the last layer (84.852 km').
  std::array<double, kLayers + 1> base_h_, base_t_, base_p_;
  std::array<double, kLayers> lapse_;
  AtmosphereState in_layer(int b, double h_geopotential) const;
};

}  // namespace hawser
