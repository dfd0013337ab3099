// The U.S. Standard Atmosphere 1976 model against the standard's published tables.
#include "catch_compat.hpp"

#include <cmath>

#include "models/standard_atmosphere.hpp"

using namespace hawser;

namespace {
const StandardAtmosphere1976 kAtm;
constexpr double kR0 = 6356766.0;  // the standard's r0 [m]

// Geometric altitude of a geopotential altitude: z = r0 H / (r0 - H).
double geometric_of(double h_geopotential_m) { return kR0 * h_geopotential_m / (kR0 - h_geopotential_m); }
}  // namespace

TEST_CASE("standard atmosphere 1976: densities against the published table", "[environment]") {
  // U.S. Standard Atmosphere 1976, table by geometric altitude; every value recalled from memory.
  struct Row {
    double z_m, rho;
  };
  const Row rows[] = {
      {0.0, 1.2250},          // sea level
      {10000.0, 4.1351e-1},   // 10 km
      {11000.0, 3.6480e-1},   // 11 km
      {20000.0, 8.8910e-2},   // 20 km
      {32000.0, 1.3555e-2},   // 32 km
      {50000.0, 1.0269e-3},   // 50 km
      {70000.0, 8.2829e-5},   // 70 km
      {80000.0, 1.8458e-5},   // 80 km
      {86000.0, 6.958e-6},    // 86 km, top of the lower atmosphere
      {-1000.0, 1.3470},      // -1 km (the table starts at -5 km)
  };
  for (const Row& r : rows) {
    INFO("z = " << r.z_m << " m");
    CHECK(kAtm.at(r.z_m).density_kg_m3 == Approx(r.rho).epsilon(0.005));
  }
  // At the bases of the 47 km' and 71 km' layers (geopotential; geometric 47.350 km and 71.802 km):
  // 1.4275e-3 and 6.4211e-5 kg/m^3 (the standard's table by geopotential altitude, recalled from memory).
  CHECK(kAtm.at(geometric_of(47000.0)).density_kg_m3 == Approx(1.4275e-3).epsilon(0.005));
  CHECK(kAtm.at(geometric_of(71000.0)).density_kg_m3 == Approx(6.4211e-5).epsilon(0.005));
}

TEST_CASE("standard atmosphere 1976: temperature and pressure at the layer bases", "[environment]") {
  // The standard's layer table: base geopotential altitude, molecular-scale temperature and
  // pressure (recalled from memory; the pressures are given there to 7 digits).
  struct Base {
    double h_m, t_k, p_pa;
  };
  const Base bases[] = {
      {0.0, 288.15, 101325.0},     {11000.0, 216.65, 22632.06},  {20000.0, 216.65, 5474.889},
      {32000.0, 228.65, 868.0187}, {47000.0, 270.65, 110.9063},  {51000.0, 270.65, 66.93887},
      {71000.0, 214.65, 3.956420}, {84852.0, 186.946, 0.3733836},
  };
  for (const Base& b : bases) {
    INFO("H = " << b.h_m << " m'");
    const AtmosphereState s = kAtm.at(geometric_of(b.h_m));
    CHECK(s.temperature_k == Approx(b.t_k).epsilon(1e-6));
    CHECK(s.pressure_pa == Approx(b.p_pa).epsilon(2e-6));
  }
  // By geometric altitude (same table as the densities, recalled from memory):
  CHECK(kAtm.at(11000.0).pressure_pa == Approx(2.2700e4).epsilon(5e-4));
  CHECK(kAtm.at(20000.0).pressure_pa == Approx(5.5293e3).epsilon(5e-4));
  CHECK(kAtm.at(32000.0).pressure_pa == Approx(8.8890e2).epsilon(5e-4));
  CHECK(kAtm.at(11000.0).temperature_k == Approx(216.774).epsilon(1e-5));
  CHECK(kAtm.at(32000.0).temperature_k == Approx(228.490).epsilon(1e-5));
}

TEST_CASE("standard atmosphere 1976: hydrostatic balance and the ideal gas law", "[environment]") {
  // dP/dz = -rho g(z), g(z) = g0 (r0 / (r0 + z))^2 (the hydrostatic equation the standard
  // integrates), checked by central differences in geometric altitude, in every layer and in the
  // isothermal extension above 86 km; and rho = P M0 / (R* T).
  const double g0 = 9.80665, m0 = 28.9644, rstar = 8314.32;
  for (double z : {500.0, 5000.0, 15000.0, 25000.0, 40000.0, 49000.0, 60000.0, 80000.0, 95000.0, 150000.0}) {
    INFO("z = " << z << " m");
    const double dz = 1.0;
    const double dpdz = (kAtm.at(z + dz).pressure_pa - kAtm.at(z - dz).pressure_pa) / (2.0 * dz);
    const AtmosphereState s = kAtm.at(z);
    const double g = g0 * std::pow(kR0 / (kR0 + z), 2);
    CHECK(dpdz == Approx(-s.density_kg_m3 * g).epsilon(1e-6));
    CHECK(s.density_kg_m3 == Approx(s.pressure_pa * m0 / (rstar * s.temperature_k)).epsilon(1e-12));
  }
}

TEST_CASE("standard atmosphere 1976: the stated treatment outside 0-86 km", "[environment]") {
  // Continuous across 86 km, decreasing, within 5 % of the standard at 100 km (5.604e-7 kg/m^3,
  // recalled from memory; the isothermal continuation gives 5.80e-7), negligible at geostationary
  // altitude (35,786 km).
  const double z86 = geometric_of(84852.0);
  CHECK(kAtm.at(z86 * (1 + 1e-12)).density_kg_m3 == Approx(kAtm.at(z86 * (1 - 1e-12)).density_kg_m3).epsilon(1e-9));
  double last = kAtm.at(86000.0).density_kg_m3;
  for (double z = 90000.0; z < 1.0e6; z += 10000.0) {
    const double rho = kAtm.at(z).density_kg_m3;
    CHECK(rho < last);
    last = rho;
  }
  CHECK(kAtm.at(100000.0).density_kg_m3 == Approx(5.604e-7).epsilon(0.05));
  CHECK(kAtm.at(3.5786e7).density_kg_m3 < 1e-300);
  CHECK(kAtm.at(3.5786e7).density_kg_m3 >= 0.0);
  // Below -5 km the state is clamped to its -5 km value; between, the first layer is extrapolated
  // (temperature rising 6.5 K per km' downward).
  CHECK(kAtm.at(-8000.0).density_kg_m3 == kAtm.at(-5000.0).density_kg_m3);
  const double h = StandardAtmosphere1976::geopotential_altitude(-3000.0);
  CHECK(kAtm.at(-3000.0).temperature_k == Approx(288.15 - 6.5e-3 * h).epsilon(1e-12));
}
