// Mean wind profiles and discrete 1-cosine gusts.
#include "catch_compat.hpp"

#include <cmath>

#include "models/discrete_gust.hpp"
#include "models/wind_profile.hpp"

using namespace hawser;

namespace {
constexpr double kForever = WindProfile::kForever;
constexpr double kPi = 3.14159265358979323846;
}  // namespace

TEST_CASE("wind profile: power law and logarithmic law values", "[environment]") {
  // Power law u = u_ref (h / h_ref)^alpha with alpha = 1/2 so that the values are exact by hand:
  // u_ref = 10 m/s at 25 m -> 20 m/s at 100 m, 5 m/s at 6.25 m; capped at 400 m (40 m/s).
  const auto p = WindProfile::power_law({10.0, 25.0, 0.5}, 400.0, 270.0, 0.0, kForever);
  CHECK(p.speed(100.0) == Approx(20.0).epsilon(1e-14));
  CHECK(p.speed(6.25) == Approx(5.0).epsilon(1e-14));
  CHECK(p.speed(400.0) == Approx(40.0).epsilon(1e-14));
  CHECK(p.speed(5000.0) == Approx(40.0).epsilon(1e-14));  // held above the top altitude
  CHECK(p.speed(0.0) == 0.0);
  // With alpha = 1/7 (open country, common practice): u(2h) / u(h) = 2^(1/7) = 1.104089514 (hand value).
  const auto p7 = WindProfile::power_law({10.0, 10.0, 1.0 / 7.0}, 1000.0, 0.0, 0.0, kForever);
  CHECK(p7.speed(60.0) / p7.speed(30.0) == Approx(1.104089514).epsilon(1e-9));

  // Log law u = (u* / kappa) ln(h / z0) with u* = 0.4 m/s, kappa = 0.4, z0 = 0.1 m:
  // u = ln(10 h): 2 m/s at h = 0.1 e^2 = 0.738906 m, 0 at z0, 1 m/s per factor e in height.
  const auto lg = WindProfile::log_law({0.4, 0.1, 0.4}, 300.0, 0.0, 0.0, kForever);
  CHECK(lg.speed(0.1 * std::exp(2.0)) == Approx(2.0).epsilon(1e-14));
  CHECK(lg.speed(0.1) == 0.0);
  CHECK(lg.speed(0.05) == 0.0);
  CHECK(lg.speed(100.0 * std::exp(1.0)) - lg.speed(100.0) == Approx(1.0).epsilon(1e-12));
  CHECK(lg.speed(1000.0) == Approx(std::log(3000.0)).epsilon(1e-14));  // capped at 300 m
}

TEST_CASE("wind profile: meteorological direction convention", "[environment]") {
  // The direction is where the wind blows FROM, clockwise from north (WMO practice, common
  // practice): from the west (270) it blows toward +east, from the north (0) toward -north,
  // from the south-west (225) toward the north-east.
  const double u = 12.0;
  auto at = [&](double from_deg) {
    return WindProfile::table({{0.0, u, from_deg}}, 0.0, kForever).velocity_enu(100.0, 1.0);
  };
  const Eigen::Vector3d w = at(270.0), n = at(0.0), e = at(90.0), sw = at(225.0);
  CHECK(w.x() == Approx(u));
  CHECK(std::abs(w.y()) < 1e-12);
  CHECK(n.y() == Approx(-u));
  CHECK(std::abs(n.x()) < 1e-12);
  CHECK(e.x() == Approx(-u));
  CHECK(sw.x() == Approx(u / std::sqrt(2.0)));
  CHECK(sw.y() == Approx(u / std::sqrt(2.0)));
  CHECK(w.z() == 0.0);
}

TEST_CASE("wind profile: table interpolation and time window", "[environment]") {
  // A jet-stream-like table: linear in altitude between rows, held beyond the ends.
  const auto t = WindProfile::table({{0.0, 5.0, 270.0}, {1000.0, 15.0, 270.0}, {10000.0, 45.0, 250.0},
                                     {12000.0, 25.0, 350.0}, {14000.0, 5.0, 10.0}},
                                    100.0, 200.0);
  CHECK(t.speed(500.0) == Approx(10.0));                 // halfway between 5 and 15
  CHECK(t.speed(7000.0) == Approx(15.0 + 30.0 * 6.0 / 9.0));
  CHECK(t.from_direction_deg(5500.0) == Approx(260.0));  // halfway between 270 and 250
  CHECK(t.from_direction_deg(11000.0) == Approx(300.0)); // halfway between 250 and 350
  CHECK(t.from_direction_deg(13000.0) == Approx(0.0).margin(1e-9));  // 350 -> 10 passes through north
  CHECK(t.speed(20000.0) == Approx(5.0));                // held above the table
  CHECK(t.speed(-10.0) == Approx(5.0));                  // and below it
  // Wind from the north at 13 km blows toward -north at 15 m/s.
  const Eigen::Vector3d v = t.velocity_enu(13000.0, 150.0);
  CHECK(v.y() == Approx(-15.0));
  CHECK(std::abs(v.x()) < 1e-9);
  // Active on [start, end): zero before, at the end and after.
  CHECK(t.velocity_enu(500.0, 99.999).norm() == 0.0);
  CHECK(t.velocity_enu(500.0, 100.0).norm() == Approx(10.0));
  CHECK(t.velocity_enu(500.0, 199.999).norm() == Approx(10.0));
  CHECK(t.velocity_enu(500.0, 200.0).norm() == 0.0);
  CHECK_THROWS(WindProfile::table({{0.0, 1.0, 0.0}, {0.0, 2.0, 0.0}}, 0.0, 1.0));
  CHECK_THROWS(WindProfile::table({{0.0, 1.0, 0.0}}, 5.0, 5.0));
}

namespace {
DiscreteGustSpec gust_spec() {
  DiscreteGustSpec g;
  g.amplitude_m_s = 20.0;
  g.gradient_time_s = 4.0;
  g.direction_enu = Eigen::Vector3d(3.0, 4.0, 0.0);  // normalised to (0.6, 0.8, 0)
  g.altitude_low_m = 1000.0;
  g.altitude_high_m = 3000.0;
  g.edge_width_m = 0.0;
  g.onset_s = 50.0;
  return g;
}
}  // namespace

TEST_CASE("discrete gust: the 1-cosine shape of the gust-load rules", "[environment]") {
  // U(s) = (U_ds / 2)(1 - cos(pi s / H)), 0 <= s <= 2H (14 CFR 25.341(a)), in time s/H = (t - t0)/t_H:
  // 0 at onset and end, U_ds at the peak, U_ds / 2 at a quarter and three quarters, symmetric.
  const DiscreteGust g(gust_spec());
  const double t0 = 50.0, th = 4.0, uds = 20.0;
  CHECK(g.speed(t0) == 0.0);
  CHECK(std::abs(g.speed(t0 + 2.0 * th)) < 1e-12);
  CHECK(g.speed(t0 + th) == Approx(uds).epsilon(1e-15));
  CHECK(g.speed(t0 + 0.5 * th) == Approx(uds / 2.0).epsilon(1e-14));
  CHECK(g.speed(t0 + 1.5 * th) == Approx(uds / 2.0).epsilon(1e-14));
  for (double x : {0.1, 0.37, 0.8, 1.0}) CHECK(g.speed(t0 + th - x) == Approx(g.speed(t0 + th + x)).epsilon(1e-12));
  // Onset: nothing before it or after the end.
  CHECK(g.speed(t0 - 1e-9) == 0.0);
  CHECK(g.speed(t0 + 2.0 * th + 1e-9) == 0.0);
  CHECK(g.speed(t0 + 0.01) > 0.0);
  CHECK(g.onset_s() == t0);
  CHECK(g.end_s() == t0 + 2.0 * th);
  // The rules' gradient distance met at a speed: H = 350 ft = 106.68 m at 100 m/s -> t_H = 1.0668 s.
  CHECK(DiscreteGust::gradient_time(106.68, 100.0) == Approx(1.0668));
}

TEST_CASE("discrete gust: direction and altitude band", "[environment]") {
  const DiscreteGust sharp(gust_spec());
  const double tp = 54.0;  // the peak
  const Eigen::Vector3d v = sharp.velocity_enu(2000.0, tp);
  CHECK(v.x() == Approx(12.0));  // 20 * 0.6
  CHECK(v.y() == Approx(16.0));  // 20 * 0.8
  CHECK(v.z() == 0.0);
  CHECK(sharp.velocity_enu(999.0, tp).norm() == 0.0);   // below the band
  CHECK(sharp.velocity_enu(3001.0, tp).norm() == 0.0);  // above it
  CHECK(sharp.velocity_enu(1000.0, tp).norm() == Approx(20.0));  // sharp edge: full at the edge

  DiscreteGustSpec s = gust_spec();
  s.edge_width_m = 200.0;
  const DiscreteGust smooth(s);
  CHECK(smooth.band(1000.0) == 0.0);
  CHECK(smooth.band(1100.0) == Approx(0.5));   // halfway up the cosine ramp
  CHECK(smooth.band(1200.0) == Approx(1.0));
  CHECK(smooth.band(2000.0) == 1.0);
  CHECK(smooth.band(2850.0) == Approx(0.5 * (1.0 - std::cos(kPi * 150.0 / 200.0))));
  CHECK(smooth.band(3000.0) == Approx(0.0).margin(1e-15));
  CHECK(smooth.band(3100.0) == 0.0);
  s.edge_width_m = 1500.0;  // wider than half the band
  CHECK_THROWS(DiscreteGust(s));
}

TEST_CASE("discrete gust: a set of gusts adds up", "[environment]") {
  DiscreteGustSpec a = gust_spec(), b = gust_spec();
  b.amplitude_m_s = 10.0;
  b.gradient_time_s = 2.0;
  b.direction_enu = Eigen::Vector3d(0.0, 0.0, 1.0);  // vertical
  b.onset_s = 53.0;
  GustSet set;
  set.add(DiscreteGust(a));
  set.add(DiscreteGust(b));
  REQUIRE(set.size() == 2);
  for (double t : {49.0, 51.0, 54.0, 55.0, 56.5, 58.0, 60.0}) {
    const Eigen::Vector3d sum = set.velocity_enu(2000.0, t);
    const Eigen::Vector3d expect = DiscreteGust(a).velocity_enu(2000.0, t) + DiscreteGust(b).velocity_enu(2000.0, t);
    CHECK((sum - expect).norm() < 1e-12);
  }
  // At t = 55: the first gust at s/H = 5/4 (U = 10 (1 - cos(5 pi / 4))), the second at its peak (10 up).
  const Eigen::Vector3d v = set.velocity_enu(2000.0, 55.0);
  const double u1 = 10.0 * (1.0 - std::cos(1.25 * kPi));
  CHECK(v.x() == Approx(0.6 * u1));
  CHECK(v.y() == Approx(0.8 * u1));
  CHECK(v.z() == Approx(10.0));
  const std::vector<double> ev = set.event_times();
  REQUIRE(ev.size() == 4);
  CHECK(ev[0] == 50.0);
  CHECK(ev[1] == 53.0);
  CHECK(ev[2] == 57.0);
  CHECK(ev[3] == 58.0);
}
