// Tidal acceleration of the Moon and the Sun in the rotating frame.
#include "catch_compat.hpp"

#include <cmath>

#include "models/third_body_tide.hpp"

using namespace hawser;

namespace {
constexpr double kPi = 3.14159265358979323846;
constexpr double kOmegaEarth = 7.292115e-5;  // WGS 84 spin rate [rad/s] (NIMA TR8350.2 Table 3.1)
constexpr double kEarthRadius = 6378137.0;   // WGS 84 equatorial radius [m] (same table)

// The direct difference of two Newtonian attractions, in long double so that the cancellation of
// the two nearly equal terms leaves enough digits for a reference (independent of the model's
// rearranged formula).
Eigen::Vector3d direct_tide(double gm, const Eigen::Vector3d& d, const Eigen::Vector3d& r) {
  long double a[3];
  long double p[3], dd[3];
  for (int i = 0; i < 3; ++i) {
    dd[i] = d(i);
    p[i] = static_cast<long double>(d(i)) - static_cast<long double>(r(i));
  }
  const long double pn = std::sqrt(p[0] * p[0] + p[1] * p[1] + p[2] * p[2]);
  const long double dn = std::sqrt(dd[0] * dd[0] + dd[1] * dd[1] + dd[2] * dd[2]);
  for (int i = 0; i < 3; ++i) a[i] = gm * (p[i] / (pn * pn * pn) - dd[i] / (dn * dn * dn));
  return Eigen::Vector3d(static_cast<double>(a[0]), static_cast<double>(a[1]), static_cast<double>(a[2]));
}

ThirdBody equatorial(ThirdBody b) {
  b.inclination_rad = 0.0;
  return b;
}
}  // namespace

TEST_CASE("third-body tide: against the direct difference of two attractions", "[environment]") {
  const ThirdBody moon = earth_moon_mean_orbit(), sun = earth_sun_mean_orbit();
  const Eigen::Vector3d dm(2.0e8, -3.0e8, 1.1e8), ds(1.2e11, 8.0e10, 3.5e10);
  // Points on the ground, at geostationary radius and far up a tether (100,000 km).
  for (const Eigen::Vector3d& r : {Eigen::Vector3d(kEarthRadius, 0, 0), Eigen::Vector3d(0, 4.2164e7, 1.0e3),
                                   Eigen::Vector3d(-1.0e8, 2.0e7, -5.0e6)}) {
    for (int body = 0; body < 2; ++body) {
      const double gm = body == 0 ? moon.gm_m3_s2 : sun.gm_m3_s2;
      const Eigen::Vector3d& d = body == 0 ? dm : ds;
      const Eigen::Vector3d ref = direct_tide(gm, d, r), a = ThirdBodyTide::tidal_acceleration(gm, d, r);
      INFO("body " << body << ", r = " << r.transpose());
      CHECK((a - ref).norm() < 1e-12 * ref.norm());
    }
  }
}

TEST_CASE("third-body tide: leading-order (quadrupole) tide", "[environment]") {
  // To first order in x = r/d (Murray & Dermott, Solar System Dynamics, ch. 4, recalled from
  // memory): 2 GM r / d^3 outward along the line to the body, GM r / d^3 inward across it. The
  // next (octupole) term is 3/2 x of the leading one along the line, so the relative error must be
  // below 2 x and shrink in proportion to x.
  const ThirdBody moon = earth_moon_mean_orbit();
  const double gm = moon.gm_m3_s2, d = moon.orbit_radius_m;
  const Eigen::Vector3d dv(d, 0.0, 0.0);
  double last_err = 1.0;
  for (double r : {4.0e7, 2.0e7, kEarthRadius}) {
    const double x = r / d, lead = gm * r / (d * d * d);
    const Eigen::Vector3d near = ThirdBodyTide::tidal_acceleration(gm, dv, Eigen::Vector3d(r, 0, 0));
    const Eigen::Vector3d far = ThirdBodyTide::tidal_acceleration(gm, dv, Eigen::Vector3d(-r, 0, 0));
    const Eigen::Vector3d side = ThirdBodyTide::tidal_acceleration(gm, dv, Eigen::Vector3d(0, r, 0));
    const double err = std::abs(near.x() / (2.0 * lead) - 1.0);
    INFO("r = " << r << " m, x = " << x);
    CHECK(err < 2.0 * x);
    CHECK(err > 1.0 * x);  // the octupole term (1.5 x) is really there
    CHECK(err < last_err);
    last_err = err;
    CHECK(far.x() / (-2.0 * lead) == Approx(1.0).margin(2.0 * x));  // the far side is pulled away too
    CHECK(side.y() / (-lead) == Approx(1.0).margin(2.0 * x * x + 1e-12));
  }
  // Figures at the Earth's surface, from the half-difference of the near- and far-side tides
  // (which removes the octupole term): the lunar tide is about 1.1e-6 m/s^2 (about 1.1e-7 g, a
  // textbook figure, recalled from memory), and the solar tide is 0.46 of it (textbook ratio,
  // e.g. Murray & Dermott, recalled from memory).
  const ThirdBody sun = earth_sun_mean_orbit();
  auto amplitude = [](double gm_b, double d_b) {
    const Eigen::Vector3d db(d_b, 0.0, 0.0), r(kEarthRadius, 0.0, 0.0);
    return 0.5 * (ThirdBodyTide::tidal_acceleration(gm_b, db, r).x() - ThirdBodyTide::tidal_acceleration(gm_b, db, -r).x());
  };
  const double am = amplitude(gm, d), as = amplitude(sun.gm_m3_s2, sun.orbit_radius_m);
  CHECK(am == Approx(1.1e-6).epsilon(0.02));
  CHECK(as / am == Approx(0.46).epsilon(0.02));
}

TEST_CASE("third-body tide: gradient and potential against finite differences", "[environment]") {
  const ThirdBodyTide tide({earth_moon_mean_orbit(), earth_sun_mean_orbit()}, kOmegaEarth);
  const double t = 12345.0;
  for (const Eigen::Vector3d& r : {Eigen::Vector3d(kEarthRadius, 1.0e5, -2.0e5), Eigen::Vector3d(3.0e7, 2.0e7, 1.0e6),
                                   Eigen::Vector3d(-9.0e7, 1.0e7, 0.0)}) {
    const Eigen::Matrix3d g = tide.gradient(r, t);
    Eigen::Matrix3d fd;
    const double h = 1.0e3;  // [m]; central differences, error ~ h^2 a''' (tiny against r ~ 1e7 m)
    for (int j = 0; j < 3; ++j) {
      Eigen::Vector3d e = Eigen::Vector3d::Zero();
      e(j) = h;
      fd.col(j) = (tide.acceleration(r + e, t) - tide.acceleration(r - e, t)) / (2.0 * h);
      const double dudx = (tide.potential(r + e, t) - tide.potential(r - e, t)) / (2.0 * h);
      CHECK(-dudx == Approx(tide.acceleration(r, t)(j)).epsilon(1e-6).margin(1e-6 * tide.acceleration(r, t).norm()));
    }
    INFO("r = " << r.transpose());
    CHECK((g - fd).norm() < 1e-6 * g.norm());
    CHECK((g - g.transpose()).norm() < 1e-12 * g.norm());  // a potential field
  }
  CHECK(tide.potential(Eigen::Vector3d::Zero(), t) == 0.0);
  CHECK(tide.acceleration(Eigen::Vector3d::Zero(), t).norm() == 0.0);
}

TEST_CASE("third-body tide: the Moon returns after one lunar day in the rotating frame", "[environment]") {
  // d(t) = R_z(-Omega t) d_I(t): an equatorial Moon comes back to the same rotating-frame place
  // after 2 pi / (Omega - n) = 24.84 h (the lunar day; WGS 84 Omega, sidereal month 27.321661 d),
  // half of which, 12.42 h, is the period of the principal lunar semi-diurnal tide M2
  // (12.4206 h, e.g. Pugh, Tides, Surges and Mean Sea-Level, recalled from memory).
  ThirdBody moon = equatorial(earth_moon_mean_orbit());
  moon.initial_phase_rad = 0.3;
  const ThirdBodyTide tide({moon}, kOmegaEarth);
  const double day = tide.synodic_day_s(0);
  CHECK(day / 3600.0 == Approx(24.84).epsilon(2e-4));
  CHECK(day / 7200.0 == Approx(12.4206).epsilon(1e-4));
  for (double t0 : {0.0, 5.0e4, 1.0e6}) {
    const Eigen::Vector3d a = tide.body_position(0, t0), b = tide.body_position(0, t0 + day);
    CHECK((a - b).norm() < 1e-9 * a.norm());
    // and not before: a quarter and a half lunar day later it is 90 and 180 degrees away.
    const Eigen::Vector3d q = tide.body_position(0, t0 + day / 4), h = tide.body_position(0, t0 + day / 2);
    CHECK(a.dot(q) == Approx(0.0).margin(1e-9 * a.squaredNorm()));
    CHECK(a.dot(h) == Approx(-a.squaredNorm()).epsilon(1e-9));
  }
  // In the rotating frame the Moon moves westward (toward -y from +x): the Earth turns faster.
  const ThirdBodyTide t2({equatorial(earth_moon_mean_orbit())}, kOmegaEarth);
  CHECK(t2.body_position(0, 0.0).x() == Approx(moon.orbit_radius_m));
  CHECK(t2.body_position(0, 600.0).y() < 0.0);
  // Semi-diurnal tide at the anchor (R, 0, 0): with the Moon overhead at t = 0 and underfoot half a
  // lunar day later, the radial tide is outward (about 2 GM R / d^3) both times, and inward
  // (about -GM R / d^3) a quarter of a lunar day later.
  const Eigen::Vector3d anchor(kEarthRadius, 0.0, 0.0);
  const double lead = moon.gm_m3_s2 * kEarthRadius / std::pow(moon.orbit_radius_m, 3);
  const double x = kEarthRadius / moon.orbit_radius_m;
  CHECK(t2.acceleration(anchor, 0.0).x() / (2.0 * lead) == Approx(1.0).margin(2.0 * x));
  CHECK(t2.acceleration(anchor, day / 2).x() / (2.0 * lead) == Approx(1.0).margin(2.0 * x));
  CHECK(t2.acceleration(anchor, day / 4).x() / (-lead) == Approx(1.0).margin(2.0 * x));
  // An inclined orbit stays at the orbit radius, and its latitude reaches +-i.
  const ThirdBody inclined = earth_moon_mean_orbit();
  const ThirdBodyTide t3({inclined}, kOmegaEarth);
  double zmax = 0.0;
  for (double t = 0.0; t < inclined.sidereal_period_s; t += 3600.0) {
    const Eigen::Vector3d p = t3.body_position(0, t);
    CHECK(p.norm() == Approx(inclined.orbit_radius_m).epsilon(1e-12));
    zmax = std::max(zmax, p.z());
  }
  CHECK(zmax / inclined.orbit_radius_m == Approx(std::sin(inclined.inclination_rad)).epsilon(1e-4));
}
