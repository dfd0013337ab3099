// Every analytic Jacobian against central finite differences of the force assembly
// (style.md habit 11; the finite-difference Jacobian is the independent reference).
#include "catch_compat.hpp"

#include <random>

#include "models/bar_elements.hpp"
#include "models/planet_gravity.hpp"
#include "models/rotating_frame.hpp"
#include "models/uniform_gravity.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/tether_system.hpp"

using namespace hawser;

namespace {

struct Scene {
  Matrix3X x, v;
  Eigen::VectorXd m;
};

// A short chain of 6 nodes at tether-like scales: radius ~ 1e7 m, elements ~ 1e5 m, off the
// equatorial plane and off the straight line so that every term is exercised.
Scene scene(double radius, double spacing, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  const int n = 6;
  Scene s{Matrix3X(3, n), Matrix3X(3, n), Eigen::VectorXd(n)};
  for (int i = 0; i < n; ++i) {
    s.x.col(i) << radius + spacing * i, 0.01 * spacing * u(rng), 0.2 * radius + 0.01 * spacing * u(rng);
    s.v.col(i) << 3.0 * u(rng), 5.0 * u(rng), 2.0 * u(rng);
    s.m[i] = 1000.0 * (1.5 + u(rng));
  }
  return s;
}

// Max relative difference between analytic and finite-difference blocks, for x or v.
double fd_error(const ForceModel& model, Scene s, bool wrt_velocity, double h) {
  const Eigen::Index n = s.x.cols();
  NodeJacobian jac(n);
  model.add_jacobian(TetherState{0.0, s.x, s.v, s.m}, jac);
  double max_diff = 0.0, max_ref = 0.0;
  for (Eigen::Index j = 0; j < n; ++j)
    for (int b = 0; b < 3; ++b) {
      Matrix3X fp = Matrix3X::Zero(3, n), fm = Matrix3X::Zero(3, n);
      Matrix3X& q = wrt_velocity ? s.v : s.x;
      const double q0 = q(b, j);
      q(b, j) = q0 + h;
      model.add_forces(TetherState{0.0, s.x, s.v, s.m}, fp);
      q(b, j) = q0 - h;
      model.add_forces(TetherState{0.0, s.x, s.v, s.m}, fm);
      q(b, j) = q0;
      for (Eigen::Index i = 0; i < n; ++i) {
        const Eigen::Vector3d fd = (fp.col(i) - fm.col(i)) / (2 * h);
        const bool neighbour = std::abs(long(i) - long(j)) <= 1;
        for (int a = 0; a < 3; ++a) {
          const double an = neighbour ? (wrt_velocity ? jac.dv(i, j)(a, b) : jac.dx(i, j)(a, b)) : 0.0;
          max_diff = std::max(max_diff, std::abs(an - fd[a]));
          max_ref = std::max(max_ref, std::abs(fd[a]));
        }
      }
    }
  return max_ref == 0.0 ? max_diff : max_diff / max_ref;
}

// Difference of two models, to check a small term (J2) on its own scale.
class Difference : public ForceModel {
 public:
  Difference(const ForceModel& a, const ForceModel& b) : a_(a), b_(b) {}
  std::string name() const override { return "difference"; }
  void add_forces(const TetherState& s, Matrix3X& f) const override {
    Matrix3X g = Matrix3X::Zero(3, f.cols());
    a_.add_forces(s, f);
    b_.add_forces(s, g);
    f -= g;
  }
  void add_jacobian(const TetherState& s, NodeJacobian& j) const override {
    NodeJacobian k(j.nodes());
    a_.add_jacobian(s, j);
    b_.add_jacobian(s, k);
    for (std::size_t i = 0; i < j.nodes(); ++i)
      for (std::size_t q = (i ? i - 1 : 0); q <= std::min(i + 1, j.nodes() - 1); ++q) {
        j.dx(i, q) -= k.dx(i, q);
        j.dv(i, q) -= k.dv(i, q);
      }
  }

 private:
  const ForceModel& a_;
  const ForceModel& b_;
};

Planet earth() {
  Planet p;
  p.gm_m3_s2 = 3.986004418e14;  // WGS 84 (NIMA TR8350.2 Table 3.1)
  p.spin_rate_rad_s = 7.292115e-5;
  p.equatorial_radius_m = 6378137.0;
  p.j2 = 1.08262982e-3;
  return p;
}

}  // namespace

TEST_CASE("bar elements: analytic Jacobian matches finite differences", "[jacobian]") {
  Scene s = scene(1e7, 1e5, 1);
  // A long retardation time makes the damping terms of the Jacobian large enough to check.
  std::vector<double> l0(5), ea(5, 6e6), tau(5, 50.0);
  for (int e = 0; e < 5; ++e) l0[e] = 0.97 * (s.x.col(e + 1) - s.x.col(e)).norm();  // all taut
  const BarElements bars(ea, l0, tau);
  CHECK(fd_error(bars, s, false, 1e-2) < 1e-6);
  CHECK(fd_error(bars, s, true, 1e-4) < 1e-6);
  const BarElements undamped(ea, l0, std::vector<double>(5, 0.0));
  CHECK(fd_error(undamped, s, false, 1e-2) < 1e-6);
}

TEST_CASE("bar elements carry tension only", "[jacobian]") {
  Scene s = scene(1e7, 1e5, 2);
  std::vector<double> l0(5), ea(5, 6e6), tau(5, 0.0);
  for (int e = 0; e < 5; ++e) l0[e] = (e == 2 ? 1.05 : 0.97) * (s.x.col(e + 1) - s.x.col(e)).norm();
  const BarElements bars(ea, l0, tau);
  std::vector<double> t;
  bars.tensions(TetherState{0.0, s.x, s.v, s.m}, t);
  CHECK(t[2] == 0.0);  // slack: carries nothing
  CHECK(t[1] > 0.0);
  CHECK(fd_error(bars, s, false, 1e-2) < 1e-6);  // and the Jacobian knows it
}

TEST_CASE("bar elements: the rupture indicator changes sign where a tension reaches its capacity",
          "[jacobian][rupture]") {
  // Reference: the tensions themselves (T = k (l - L0) + c ldot, physics.md section 3). For
  // each element in turn the capacity is set just below and just above its tension: the
  // indicator must be positive and negative, undamped (squared lengths) and damped alike.
  Scene s = scene(1e7, 1e5, 4);
  std::vector<double> l0(5), ea(5, 6e6);
  for (int e = 0; e < 5; ++e) l0[e] = (e == 3 ? 1.05 : 0.97) * (s.x.col(e + 1) - s.x.col(e)).norm();
  for (double tau : {0.0, 50.0}) {
    const BarElements bars(ea, l0, std::vector<double>(5, tau));
    const TetherState st{0.0, s.x, s.v, s.m};
    std::vector<double> t;
    bars.tensions(st, t);
    CHECK(t[3] == 0.0);  // slack
    for (int e = 0; e < 5; ++e) {
      if (t[e] == 0.0) continue;
      std::vector<double> cap(5, 1e30);
      cap[e] = 0.999 * t[e];
      INFO("tau " << tau << ", element " << e << ", tension " << t[e]);
      CHECK(bars.rupture_indicator(st, cap) > 0.0);
      cap[e] = 1.001 * t[e];
      CHECK(bars.rupture_indicator(st, cap) < 0.0);
    }
  }
}

TEST_CASE("gravity and rotating frame: analytic Jacobians match finite differences", "[jacobian]") {
  const Scene s = scene(1e7, 1e5, 3);
  const PlanetGravity point(earth(), false), j2(earth(), true);
  CHECK(fd_error(point, s, false, 1.0) < 1e-6);
  CHECK(fd_error(j2, s, false, 1.0) < 1e-6);
  // The J2 term alone, on its own scale (it is 1e-3 of the point-mass term).
  const Difference j2_only(j2, point);
  CHECK(fd_error(j2_only, s, false, 1.0) < 1e-6);
  const RotatingFrame frame(7.292115e-5);
  CHECK(fd_error(frame, s, false, 1.0) < 1e-6);
  CHECK(fd_error(frame, s, true, 1e-3) < 1e-6);
}

TEST_CASE("J2 acceleration is minus the gradient of its potential", "[jacobian]") {
  // Independent of the closed-form acceleration: central differences of U.
  const PlanetGravity g(earth(), true);
  const Eigen::Vector3d r(7.1e6, -2.3e6, 3.4e6);
  Eigen::Vector3d grad;
  for (int a = 0; a < 3; ++a) {
    Eigen::Vector3d p = r, m = r;
    p[a] += 10.0;
    m[a] -= 10.0;
    grad[a] = (g.potential(p) - g.potential(m)) / 20.0;
  }
  CHECK((g.acceleration(r) + grad).norm() < 1e-8 * g.acceleration(r).norm());
  // On the equator the radial J2 acceleration is -(3/2) GM J2 a^2 / r^4 (Vallado, the J2
  // perturbing acceleration at latitude 0).
  const PlanetGravity p0(earth(), false);
  const Eigen::Vector3d req(9e6, 0, 0);
  const double expected = -1.5 * 3.986004418e14 * 1.08262982e-3 * 6378137.0 * 6378137.0 / std::pow(9e6, 4);
  CHECK((g.acceleration(req) - p0.acceleration(req)).x() == Approx(expected).epsilon(1e-12));
}

TEST_CASE("the assembled band Jacobian matches finite differences of the right-hand side", "[jacobian]") {
  const std::string path = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";
  const Scenario sc = load_scenario(path, {"climbers=[]", "mesh.elements=12", "mesh.grading=uniform", "model.j2=true"});
  const TetherModel model = build_model(sc);
  TetherSystem sys(model);
  const std::size_t n = sys.size();
  std::vector<double> y(n, 0.0);
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  for (std::size_t k = sys.layout().first_free(); k <= sys.layout().last_free(); ++k)
    for (int a = 0; a < 3; ++a) {
      y[sys.layout().u(k, a)] = 2000.0 * u(rng);
      y[sys.layout().v(k, a)] = 3.0 * u(rng);
    }
  const long bw = sys.half_bandwidth();
  const long smu = 2 * bw, ldim = smu + bw + 1;
  std::vector<double> band(ldim * n, 0.0);
  const BandJacobian J{band.data(), ldim, smu, bw, bw, long(n)};
  std::vector<double> f0(n), fp(n), fm(n);
  sys.rhs(0.0, y.data(), f0.data());
  sys.jacobian(0.0, y.data(), f0.data(), J);
  double max_diff = 0.0, max_ref = 0.0;
  const std::size_t n_dyn = sys.layout().dynamic();
  for (std::size_t c = 0; c < n_dyn; ++c) {
    const double h = (c % 6 < 3) ? 1.0 : 1e-3;  // m, m/s
    std::vector<double> yp = y, ym = y;
    yp[c] += h;
    ym[c] -= h;
    sys.rhs(0.0, yp.data(), fp.data());
    sys.rhs(0.0, ym.data(), fm.data());
    for (std::size_t r = 0; r < n_dyn; ++r) {
      const double fd = (fp[r] - fm[r]) / (2 * h);
      const long diff = long(r) - long(c);
      const double an = (diff >= -bw && diff <= bw) ? J(r, c) : 0.0;
      if (std::abs(diff) > bw) REQUIRE(fd == Approx(0.0).margin(1e-12));  // the band holds everything
      max_diff = std::max(max_diff, std::abs(an - fd));
      max_ref = std::max(max_ref, std::abs(fd));
    }
  }
  CHECK(max_diff / max_ref < 1e-6);
}

TEST_CASE("the discrete equilibrium is exact", "[equilibrium]") {
  // physics.md section 3: started at the equilibrium, the right-hand side vanishes to round-off.
  const std::string path = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";
  for (const char* j2 : {"model.j2=false", "model.j2=true"}) {
    const Scenario sc = load_scenario(path, {j2, "climbers=[]"});
    const TetherModel model = build_model(sc);
    TetherSystem sys(model);
    std::vector<double> y(sys.size(), 0.0), f(sys.size());
    sys.rhs(0.0, y.data(), f.data());
    // Acceleration scale: gravity at the surface, about 10 m/s^2.
    double worst = 0.0;
    for (std::size_t k = 1; k < model.nodes(); ++k)
      for (int a = 0; a < 3; ++a) worst = std::max(worst, std::abs(f[sys.layout().v(k, a)]));
    INFO(j2);
    CHECK(worst < 1e-9);
    // Tensions at equilibrium follow the design's continuous tension closely (mesh error only).
    CHECK(model.equilibrium.tension_n.front() > 0.0);
  }
}

TEST_CASE("the structured Newton solver solves (I - gamma J) x = b", "[jacobian]") {
  // Reference: the assembled band Jacobian (itself checked against finite differences above),
  // multiplied out densely.
  const std::string path = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";
  const Scenario sc = load_scenario(path, {"climbers=[]", "mesh.elements=9", "material.damping_time=0.3"});
  const TetherModel model = build_model(sc);
  TetherSystem sys(model);
  const std::size_t n = sys.size();
  std::vector<double> y(n, 0.0);
  std::mt19937 rng(11);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  for (std::size_t k = sys.layout().first_free(); k <= sys.layout().last_free(); ++k)
    for (int a = 0; a < 3; ++a) {
      y[sys.layout().u(k, a)] = 500.0 * u(rng);
      y[sys.layout().v(k, a)] = 2.0 * u(rng);
    }
  const long bw = sys.half_bandwidth();
  const long smu = 2 * bw, ldim = smu + bw + 1;
  std::vector<double> band(ldim * n, 0.0);
  const BandJacobian J{band.data(), ldim, smu, bw, bw, long(n)};
  std::vector<double> f0(n);
  sys.rhs(0.0, y.data(), f0.data());
  sys.jacobian(0.0, y.data(), f0.data(), J);
  for (double gamma : {1e-3, 0.5, 30.0}) {
    sys.newton_jacobian(0.0, y.data());
    sys.newton_factor(gamma);
    std::vector<double> b(n);
    for (auto& x : b) x = u(rng);
    std::vector<double> x(n, 0.0);
    sys.newton_solve(b.data(), x.data());
    double worst = 0.0, scale = 0.0;
    for (std::size_t r = 0; r < n; ++r) {
      double ax = x[r];
      for (std::size_t c = 0; c < n; ++c) {
        const long d = long(r) - long(c);
        if (d >= -bw && d <= bw) ax -= gamma * J(r, c) * x[c];
      }
      worst = std::max(worst, std::abs(ax - b[r]));
      scale = std::max(scale, std::abs(b[r]));
    }
    INFO("gamma " << gamma);
    CHECK(worst < 1e-9 * scale);
    // Refactoring for another gamma gives the same answer as a fresh Jacobian.
    sys.newton_factor(2 * gamma);
    std::vector<double> x1 = b;
    sys.newton_solve(x1.data(), x1.data());  // in place
    sys.newton_jacobian(0.0, y.data());
    sys.newton_factor(2 * gamma);
    std::vector<double> x2(n, 0.0);
    sys.newton_solve(b.data(), x2.data());
    for (std::size_t r = 0; r < n; ++r) CHECK(x1[r] == Approx(x2[r]).epsilon(1e-12).margin(1e-300));
  }
}
