#include "models/dryden_turbulence.hpp"

#include <Eigen/Cholesky>
#include <algorithm>
#include <cmath>
#include <random>
#include <stdexcept>
#include <string>

namespace hawser {

namespace {
constexpr double kPi = 3.14159265358979323846;
constexpr double kFoot = 0.3048;  // [m], international foot (exact)

/// Standard normal draws by Box-Muller from the raw 64-bit output of mt19937_64, so the
/// sequence does not depend on the standard library's normal_distribution.
class NormalSource {
 public:
  explicit NormalSource(std::mt19937_64& engine) : engine_(engine) {}
  double operator()() {
    if (have_spare_) {
      have_spare_ = false;
      return spare_;
    }
    constexpr double k2m53 = 1.0 / 9007199254740992.0;  // 2^-53
    const double u1 = static_cast<double>((engine_() >> 11) + 1) * k2m53;  // (0, 1]
    const double u2 = static_cast<double>(engine_() >> 11) * k2m53;        // [0, 1)
    const double r = std::sqrt(-2.0 * std::log(u1));
    spare_ = r * std::sin(2.0 * kPi * u2);
    have_spare_ = true;
    return r * std::cos(2.0 * kPi * u2);
  }

 private:
  std::mt19937_64& engine_;
  double spare_ = 0.0;
  bool have_spare_ = false;
};

/// I_n(h) = integral_0^h s^n exp(-2 s) ds for n = 0, 1, 2: a series for small h (where the
/// closed form cancels), the closed form otherwise.
double exp_moment(int n, double h) {
  if (h < 0.5) {
    // sum_k (-2)^k h^(n+k+1) / (k! (n+k+1)); terms shrink by at least 2h/k.
    double term = std::pow(h, n + 1), sum = 0.0;  // term = (-2 h)^k / k! h^(n+1)
    for (int k = 0; k < 60; ++k) {
      const double add = term / (n + k + 1);
      sum += add;
      if (std::abs(add) < 1e-18 * std::abs(sum)) break;
      term *= -2.0 * h / (k + 1);
    }
    return sum;
  }
  const double e = std::exp(-2.0 * h);
  switch (n) {
    case 0: return 0.5 * (1.0 - e);
    case 1: return 0.25 * (1.0 - e * (1.0 + 2.0 * h));
    default: return 0.25 * (1.0 - e * (1.0 + 2.0 * h + 2.0 * h * h));
  }
}

/// Exact one-step update of the second-order (lateral/vertical) Dryden filter in scaled time.
struct LateralStep {
  Eigen::Matrix2d phi;   // exp(A h)
  Eigen::Matrix2d chol;  // lower Cholesky factor of the step covariance Q
  explicit LateralStep(double h) {
    const double e = std::exp(-h);
    phi << e, e * h, 0.0, e;
    const double i0 = exp_moment(0, h), i1 = exp_moment(1, h), i2 = exp_moment(2, h);
    Eigen::Matrix2d q;
    q << i2, i1, i1, i0;
    chol = q.llt().matrixL();
  }
};

const Eigen::RowVector2d kLateralOutput(1.0 - std::sqrt(3.0), std::sqrt(3.0));  // C

void check_station(const DrydenStation& s) {
  const bool ok = s.mean_speed_m_s > 0.0 && s.sigma_u_m_s >= 0.0 && s.sigma_v_m_s >= 0.0 && s.sigma_w_m_s >= 0.0 &&
                  s.scale_u_m > 0.0 && s.scale_v_m > 0.0 && s.scale_w_m > 0.0 && std::isfinite(s.altitude_m) &&
                  std::isfinite(s.mean_speed_m_s) && std::isfinite(s.scale_u_m) && std::isfinite(s.scale_v_m) &&
                  std::isfinite(s.scale_w_m);
  if (!ok)
    throw std::invalid_argument("DrydenTurbulence: station at " + std::to_string(s.altitude_m) +
                                " m needs V > 0, sigmas >= 0 and scale lengths > 0");
}
}  // namespace

DrydenTurbulence::DrydenTurbulence(std::vector<DrydenStation> stations, std::uint64_t seed, double dt_s,
                                   double duration_s)
    : stations_(std::move(stations)), dt_(dt_s), samples_(0) {
  if (stations_.empty()) throw std::invalid_argument("DrydenTurbulence: no stations");
  if (!(dt_s > 0.0) || !(duration_s > 0.0) || !std::isfinite(duration_s))
    throw std::invalid_argument("DrydenTurbulence: sample interval and duration must be > 0");
  for (std::size_t i = 0; i < stations_.size(); ++i) {
    check_station(stations_[i]);
    if (i > 0 && !(stations_[i].altitude_m > stations_[i - 1].altitude_m))
      throw std::invalid_argument("DrydenTurbulence: station altitudes must increase strictly");
  }
  samples_ = static_cast<std::size_t>(std::ceil(duration_s / dt_s)) + 1;
  const std::size_t total = samples_ + kPad;  // and kPad samples after end_s(), for the spline

  series_.reserve(stations_.size());
  for (std::size_t st = 0; st < stations_.size(); ++st) {
    const DrydenStation& s = stations_[st];
    std::seed_seq seq{static_cast<std::uint32_t>(seed), static_cast<std::uint32_t>(seed >> 32),
                      static_cast<std::uint32_t>(st)};
    std::mt19937_64 engine(seq);
    NormalSource normal(engine);

    // Along-wind: Ornstein-Uhlenbeck, unit variance, exact AR(1) at the samples.
    const double rho = std::exp(-dt_s * s.mean_speed_m_s / s.scale_u_m);
    const double q = std::sqrt(-std::expm1(-2.0 * dt_s * s.mean_speed_m_s / s.scale_u_m));
    const LateralStep step_v(dt_s * s.mean_speed_m_s / s.scale_v_m), step_w(dt_s * s.mean_speed_m_s / s.scale_w_m);

    // Stationary start: x_u ~ N(0, 1), x_v, x_w ~ N(0, P) with chol(P) = [[1/2, 0], [1/2, 1/2]].
    double xu = normal();
    Eigen::Vector2d xv, xw, z;
    z << normal(), normal();
    xv << 0.5 * z(0), 0.5 * (z(0) + z(1));
    z << normal(), normal();
    xw << 0.5 * z(0), 0.5 * (z(0) + z(1));

    Series out(6, static_cast<Eigen::Index>(total));
    for (std::size_t k = 0; k < total; ++k) {
      const auto col = static_cast<Eigen::Index>(k);
      out(0, col) = xu;
      out(1, col) = kLateralOutput * xv;
      out(2, col) = kLateralOutput * xw;
      xu = rho * xu + q * normal();
      z << normal(), normal();
      xv = step_v.phi * xv + step_v.chol * z;
      z << normal(), normal();
      xw = step_w.phi * xw + step_w.chol * z;
    }
    fit_spline(out);
    series_.push_back(std::move(out));
  }
}

void DrydenTurbulence::fit_spline(Series& s) {
  // m_{j-1} + 4 m_j + m_{j+1} = y_{j+1} - 2 y_j + y_{j-1}, natural ends m = 0 (Thomas algorithm).
  const Eigen::Index n = s.cols();
  s.bottomRows<3>().setZero();
  if (n < 3) return;
  std::vector<double> c(static_cast<std::size_t>(n), 0.0);  // eliminated super-diagonal
  for (Eigen::Index j = 1; j + 1 < n; ++j) {
    const double denom = 4.0 - c[static_cast<std::size_t>(j - 1)];
    c[static_cast<std::size_t>(j)] = 1.0 / denom;
    const Eigen::Vector3d rhs = s.col(j + 1).head<3>() - 2.0 * s.col(j).head<3>() + s.col(j - 1).head<3>();
    s.col(j).tail<3>() = (rhs - s.col(j - 1).tail<3>()) / denom;
  }
  for (Eigen::Index j = n - 3; j >= 1; --j)
    s.col(j).tail<3>() -= c[static_cast<std::size_t>(j)] * s.col(j + 1).tail<3>();
}

Eigen::Vector3d DrydenTurbulence::unit_sample(std::size_t station, double t) const {
  // y(t) = a y_k + b y_{k+1} + (a^3 - a) m_k + (b^3 - b) m_{k+1},  b = (t - t_k) / dt, a = 1 - b.
  const double x = t / dt_;
  const auto k = std::min(static_cast<std::size_t>(x), samples_ - 2);
  const double b = x - static_cast<double>(k), a = 1.0 - b;
  const auto c = static_cast<Eigen::Index>(k);
  const Series& s = series_[station];
  return a * s.col(c).head<3>() + b * s.col(c + 1).head<3>() + (a * a * a - a) * s.col(c).tail<3>() +
         (b * b * b - b) * s.col(c + 1).tail<3>();
}

Eigen::Vector3d DrydenTurbulence::held(std::size_t station, double t) const {
  const DrydenStation& s = stations_[station];
  const Eigen::Vector3d sigma(s.sigma_u_m_s, s.sigma_v_m_s, s.sigma_w_m_s);
  if (sigma.isZero(0.0)) return Eigen::Vector3d::Zero();  // a station that ends the turbulence
  return sigma.cwiseProduct(unit_sample(station, t));
}

Eigen::Vector3d DrydenTurbulence::velocity_uvw(double h, double t) const {
  if (!(t >= 0.0 && t <= end_s()))
    throw std::out_of_range("DrydenTurbulence: time " + std::to_string(t) + " s outside the generated series [0, " +
                            std::to_string(end_s()) + "] s");
  auto sigmas = [](const DrydenStation& s) { return Eigen::Vector3d(s.sigma_u_m_s, s.sigma_v_m_s, s.sigma_w_m_s); };
  const std::size_t n = stations_.size();
  if (h <= stations_.front().altitude_m) return held(0, t);
  if (h >= stations_.back().altitude_m) return held(n - 1, t);
  std::size_t hi = 1;
  while (stations_[hi].altitude_m <= h) ++hi;  // a handful of stations: a linear scan
  const std::size_t lo = hi - 1;
  const double w = (h - stations_[lo].altitude_m) / (stations_[hi].altitude_m - stations_[lo].altitude_m);
  const Eigen::Vector3d sigma = (1.0 - w) * sigmas(stations_[lo]) + w * sigmas(stations_[hi]);
  const Eigen::Vector3d mix =
      ((1.0 - w) * unit_sample(lo, t) + w * unit_sample(hi, t)) / std::sqrt((1.0 - w) * (1.0 - w) + w * w);
  return sigma.cwiseProduct(mix);
}

Eigen::Vector3d DrydenTurbulence::to_enu(const Eigen::Vector3d& uvw, const Eigen::Vector3d& d) {
  const Eigen::Vector3d left(-d.y(), d.x(), 0.0);  // up x downwind
  return uvw(0) * d + uvw(1) * left + Eigen::Vector3d(0.0, 0.0, uvw(2));
}

DrydenStation DrydenTurbulence::mil_f_8785c_low_altitude(double h_m, double w20_m_s, double mean_speed_m_s) {
  if (!(h_m >= 10.0 * kFoot && h_m <= 1000.0 * kFoot))
    throw std::invalid_argument("DrydenTurbulence: the MIL-F-8785C low-altitude model covers 10 ft to 1000 ft");
  const double h_ft = h_m / kFoot;
  const double f = 0.177 + 0.000823 * h_ft;
  DrydenStation s{};
  s.altitude_m = h_m;
  s.mean_speed_m_s = mean_speed_m_s;
  s.sigma_w_m_s = 0.1 * w20_m_s;
  s.sigma_u_m_s = s.sigma_v_m_s = s.sigma_w_m_s / std::pow(f, 0.4);
  s.scale_w_m = h_m;
  s.scale_u_m = s.scale_v_m = h_m / std::pow(f, 1.2);
  return s;
}

}  // namespace hawser
