// Dryden turbulence (MIL-F-8785C, section 3.7.3): variance, spectrum, correlation, seeds, altitude.
//
// The analytic forms the series must follow are written out here, independently of the model
// (one-sided in the temporal frequency f [Hz], tau = L / V, x = 2 pi f tau):
//   Phi_u(f) = 2 pi Phi_u(omega) = sigma^2 4 tau / (1 + x^2)
//   Phi_v(f) = sigma^2 2 tau (1 + 3 x^2) / (1 + x^2)^2
// from Phi_u(Omega) = sigma^2 (2L/pi) / (1 + (L Omega)^2), Phi_v(Omega) = sigma^2 (L/pi)
// (1 + 3 (L Omega)^2) / (1 + (L Omega)^2)^2, omega = V Omega, Phi(omega) = Phi(Omega) / V.
// Their autocorrelations (the cosine transforms; Dryden's longitudinal and lateral correlation
// functions, e.g. Hoblit, Gust Loads on Aircraft, 1988, recalled from memory, and checked
// numerically against the transform of the spectrum while writing this test):
//   rho_u(t) = exp(-t/tau),   rho_v(t) = (1 - t / (2 tau)) exp(-t/tau).
// Statistical errors (Bartlett's formula for the variance of a sample variance of a Gaussian
// process over a time T, Var(s^2) = (2/T) integral C(t)^2 dt):
//   u: Var(s^2) / sigma^4 = 2 tau / T,   v, w: 1.25 tau / T.
#include "catch_compat.hpp"

#include <cmath>
#include <complex>
#include <unsupported/Eigen/FFT>
#include <vector>

#include "models/dryden_turbulence.hpp"
#include "models/wind_profile.hpp"

using namespace hawser;

namespace {
constexpr double kPi = 3.14159265358979323846;

DrydenStation station(double h, double v, double su, double sv, double sw, double lu, double lv, double lw) {
  DrydenStation s;
  s.altitude_m = h;
  s.mean_speed_m_s = v;
  s.sigma_u_m_s = su;
  s.sigma_v_m_s = sv;
  s.sigma_w_m_s = sw;
  s.scale_u_m = lu;
  s.scale_v_m = lv;
  s.scale_w_m = lw;
  return s;
}

// The long series shared by the variance and spectrum checks: V = 20 m/s, L = 100, 80, 60 m
// (tau = 5, 4, 3 s), sigma = 2, 1.5, 1 m/s; dt = 0.1 s (tau/30 or finer), 2^21 samples (58 h).
constexpr double kDt = 0.1;
constexpr std::size_t kN = std::size_t(1) << 21;
const double kTau[3] = {5.0, 4.0, 3.0};
const double kSigma[3] = {2.0, 1.5, 1.0};

const std::vector<Eigen::Vector3d>& long_series() {
  static const std::vector<Eigen::Vector3d> y = [] {
    const DrydenTurbulence d({station(100.0, 20.0, 2.0, 1.5, 1.0, 100.0, 80.0, 60.0)}, 20240501, kDt,
                             kDt * static_cast<double>(kN - 1));
    std::vector<Eigen::Vector3d> out(kN);
    for (std::size_t k = 0; k < kN; ++k) out[k] = d.velocity_uvw(100.0, kDt * static_cast<double>(k));
    return out;
  }();
  return y;
}

// Welch's averaged periodogram (Welch, IEEE Trans. Audio Electroacoustics 15, 1967): Hann
// window, 50 % overlap, one-sided density per Hz: P_k = 2 |X_k|^2 / (fs sum w^2). On the long
// series below it agrees with scipy.signal.welch (window 'hann', nperseg 2048, noverlap 1024,
// detrend 'constant') to every printed digit (checked while writing this test).
std::vector<double> welch(const std::vector<double>& x, std::size_t nfft, double fs, std::size_t& segments) {
  std::vector<double> w(nfft), p(nfft / 2 + 1, 0.0), seg(nfft);
  double w2 = 0.0;
  for (std::size_t n = 0; n < nfft; ++n) {
    w[n] = 0.5 - 0.5 * std::cos(2.0 * kPi * static_cast<double>(n) / static_cast<double>(nfft));  // periodic Hann
    w2 += w[n] * w[n];
  }
  Eigen::FFT<double> fft;
  std::vector<std::complex<double>> spec;
  segments = 0;
  for (std::size_t start = 0; start + nfft <= x.size(); start += nfft / 2) {
    double mean = 0.0;
    for (std::size_t n = 0; n < nfft; ++n) mean += x[start + n];
    mean /= static_cast<double>(nfft);
    for (std::size_t n = 0; n < nfft; ++n) seg[n] = (x[start + n] - mean) * w[n];
    fft.fwd(spec, seg);
    for (std::size_t k = 0; k <= nfft / 2; ++k) p[k] += std::norm(spec[k]);
    ++segments;
  }
  for (std::size_t k = 0; k <= nfft / 2; ++k) p[k] *= (k == 0 || k == nfft / 2 ? 1.0 : 2.0) / (fs * w2 * segments);
  return p;
}

double dryden_u(double sigma, double tau, double f) {
  const double x = 2.0 * kPi * f * tau;
  return sigma * sigma * 4.0 * tau / (1.0 + x * x);
}
double dryden_v(double sigma, double tau, double f) {
  const double x = 2.0 * kPi * f * tau;
  return sigma * sigma * 2.0 * tau * (1.0 + 3.0 * x * x) / ((1.0 + x * x) * (1.0 + x * x));
}

double correlation(const std::vector<double>& a, const std::vector<double>& b, std::size_t lag) {
  double ab = 0.0, aa = 0.0, bb = 0.0;
  for (std::size_t k = 0; k + lag < a.size(); ++k) {
    ab += a[k] * b[k + lag];
    aa += a[k] * a[k];
    bb += b[k + lag] * b[k + lag];
  }
  return ab / std::sqrt(aa * bb);
}

// The cardinal cubic spline: the interpolant through samples y_j is sum_j y_j L(t/dt - j) with
//   L(x) = sum_k sqrt(3) (sqrt(3) - 2)^|k| beta3(x - k),  beta3 the centred cubic B-spline,
// and its Fourier transform (f in Hz) L^(f) = sinc^4(pi f dt) / (1 - (2/3) sin^2(pi f dt))
// (Unser, Aldroubi & Eden, IEEE Trans. Signal Processing 41, 1993; Unser, IEEE Signal
// Processing Magazine 16(6), 1999; recalled from memory). Written here from those forms,
// independently of the model's tridiagonal solve.
double bspline3(double x) {
  x = std::abs(x);
  if (x < 1.0) return 2.0 / 3.0 - x * x + 0.5 * x * x * x;
  if (x < 2.0) return (2.0 - x) * (2.0 - x) * (2.0 - x) / 6.0;
  return 0.0;
}
double cardinal_spline(double x) {
  const double z = std::sqrt(3.0) - 2.0;
  double sum = 0.0;
  for (int k = -40; k <= 40; ++k) sum += std::sqrt(3.0) * std::pow(z, std::abs(k)) * bspline3(x - k);
  return sum;
}
double spline_response(double f, double dt) {
  const double x = kPi * f * dt;
  const double sinc = x == 0.0 ? 1.0 : std::sin(x) / x;
  return std::pow(sinc, 4) / (1.0 - 2.0 / 3.0 * std::sin(x) * std::sin(x));
}
double rho_u(double t, double tau) { return std::exp(-std::abs(t) / tau); }
double rho_v(double t, double tau) { return (1.0 - std::abs(t) / (2.0 * tau)) * std::exp(-std::abs(t) / tau); }

/// Variance / sigma^2 of the spline through exact samples of a stationary process with
/// correlation rho, at t = (j0 + s) dt: sum_j sum_l L(s - j) L(s - l) rho((j - l) dt).
template <class Rho>
double spline_variance_ratio(Rho rho, double s, double dt) {
  std::vector<double> w;
  for (int j = -40; j <= 40; ++j) w.push_back(cardinal_spline(s - j));
  double sum = 0.0;
  for (int j = -40; j <= 40; ++j)
    for (int l = -40; l <= 40; ++l) sum += w[std::size_t(j + 40)] * w[std::size_t(l + 40)] * rho((j - l) * dt);
  return sum;
}

std::vector<double> component(const std::vector<Eigen::Vector3d>& y, int c) {
  std::vector<double> out(y.size());
  for (std::size_t k = 0; k < y.size(); ++k) out[k] = y[k](c);
  return out;
}
}  // namespace

TEST_CASE("Dryden turbulence: variance of a long series is sigma^2", "[environment]") {
  const auto& y = long_series();
  const double t_total = kDt * static_cast<double>(kN);
  for (int c = 0; c < 3; ++c) {
    double mean = 0.0, var = 0.0;
    for (const auto& v : y) {
      mean += v(c);
      var += v(c) * v(c);
    }
    mean /= static_cast<double>(kN);
    var /= static_cast<double>(kN);  // about the known mean 0
    const double s2 = kSigma[c] * kSigma[c];
    // Standard errors from the header: Var(s^2) = (2 tau / T) sigma^4 for u, (1.25 tau / T) sigma^4
    // for v, w; Var(mean) = (integral rho dt / T) sigma^2 = (2 tau / T) sigma^2 for u, (tau / T) for v, w.
    const double rel_sd_var = std::sqrt((c == 0 ? 2.0 : 1.25) * kTau[c] / t_total);
    const double sd_mean = kSigma[c] * std::sqrt((c == 0 ? 2.0 : 1.0) * kTau[c] / t_total);
    INFO("component " << c << ": variance " << var << " vs " << s2 << ", 1 sd " << rel_sd_var * 100 << " %");
    CHECK(std::abs(var / s2 - 1.0) < 4.0 * rel_sd_var);
    CHECK(std::abs(mean) < 4.0 * sd_mean);
  }
}

TEST_CASE("Dryden turbulence: Welch spectrum follows the Dryden forms", "[environment]") {
  // Welch estimate (nfft = 2048, df = 4.9 mHz) compared with the analytic one-sided spectra over
  // bands of the reduced frequency x = 2 pi f tau from 0.3 to 8, through the corner at x = 1.
  // Tolerance per band: 4 standard deviations of the band-averaged estimate plus 1.5 % for bias.
  // Standard deviation: each Hann/50 % overlap bin has relative variance 1.056 / K over K
  // segments (Welch 1967; overlap correlation 0.167 for Hann, recalled from memory); adjacent Hann
  // bins are correlated 4/9 and bins two apart 1/36 (|sum w^2 e^(-2 pi i k n / N)|^2 / (sum w^2)^2
  // for the Hann window, computed by hand), so the mean of m bins has relative variance
  // (1.056 / K)(m + 2 (m - 1) 4/9 + 2 (m - 2) / 36) / m^2. Bias: the Hann kernel smooths the
  // spectrum over about 1/3 bin^2 (relative bias < 1 % here) and aliasing adds < 0.4 % at x = 8
  // with fs = 10 Hz.
  const auto& y = long_series();
  const double fs = 1.0 / kDt;
  const std::size_t nfft = 2048;
  const double df = fs / static_cast<double>(nfft);
  const double bands[] = {0.3, 0.5, 0.8, 1.25, 2.0, 3.2, 5.0, 8.0};
  for (int c = 0; c < 3; ++c) {
    std::size_t segments = 0;
    const std::vector<double> p = welch(component(y, c), nfft, fs, segments);
    const double tau = kTau[c];
    for (std::size_t b = 0; b + 1 < sizeof(bands) / sizeof(bands[0]); ++b) {
      const auto k0 = static_cast<std::size_t>(std::ceil(bands[b] / (2.0 * kPi * tau * df)));
      const auto k1 = static_cast<std::size_t>(std::floor(bands[b + 1] / (2.0 * kPi * tau * df)));
      double est = 0.0, ana = 0.0;
      for (std::size_t k = k0; k <= k1; ++k) {
        const double f = df * static_cast<double>(k);
        est += p[k];
        ana += c == 0 ? dryden_u(kSigma[c], tau, f) : dryden_v(kSigma[c], tau, f);
      }
      const double m = static_cast<double>(k1 - k0 + 1);
      const double rel_var = 1.056 / segments * (m + 2.0 * (m - 1.0) * 4.0 / 9.0 + 2.0 * std::max(m - 2.0, 0.0) / 36.0) / (m * m);
      const double tol = 4.0 * std::sqrt(rel_var) + 0.015;
      INFO("component " << c << ", x in [" << bands[b] << ", " << bands[b + 1] << "], " << m << " bins: estimate / Dryden = "
                        << est / ana << ", tolerance " << tol);
      CHECK(std::abs(est / ana - 1.0) < tol);
    }
  }
}

TEST_CASE("Dryden turbulence: exact discretisation keeps the correlation at a coarse interval", "[environment]") {
  // With dt = tau the samples must still have rho_u(k tau) = e^(-k) and rho_v(k tau) = (1 - k/2) e^(-k):
  // 0.3679, 0.1353 and 0.1839, 0 (the lateral correlation crosses zero at two scale lengths).
  // An explicit Euler step at this interval would be far off. Standard error of a lag
  // correlation from N samples: about sqrt((1 + 2 sum rho^2) / N) < 1.6e-3 for N = 5e5.
  const std::size_t n = 500000;
  const DrydenTurbulence d({station(0.0, 20.0, 1.0, 1.0, 1.0, 20.0, 20.0, 20.0)}, 7, 1.0, static_cast<double>(n - 1));
  std::vector<Eigen::Vector3d> y(n);
  for (std::size_t k = 0; k < n; ++k) y[k] = d.velocity_uvw(0.0, static_cast<double>(k));
  const auto u = component(y, 0), v = component(y, 1), w = component(y, 2);
  const double tol = 7e-3;
  CHECK(correlation(u, u, 1) == Approx(std::exp(-1.0)).margin(tol));
  CHECK(correlation(u, u, 2) == Approx(std::exp(-2.0)).margin(tol));
  CHECK(correlation(v, v, 1) == Approx(0.5 * std::exp(-1.0)).margin(tol));
  CHECK(correlation(v, v, 2) == Approx(0.0).margin(tol));
  CHECK(correlation(w, w, 1) == Approx(0.5 * std::exp(-1.0)).margin(tol));
  CHECK(correlation(w, w, 3) == Approx(-0.5 * std::exp(-3.0)).margin(tol));
  // The three components are independent.
  CHECK(correlation(u, v, 0) == Approx(0.0).margin(tol));
  CHECK(correlation(v, w, 0) == Approx(0.0).margin(tol));
}

TEST_CASE("Dryden turbulence: seeds, interpolation in time, range", "[environment]") {
  const std::vector<DrydenStation> st = {station(0.0, 20.0, 2.0, 2.0, 1.0, 100.0, 100.0, 50.0)};
  const double dt = 0.5, t_end = 100000.0;
  const DrydenTurbulence a(st, 42, dt, t_end), b(st, 42, dt, t_end), c(st, 43, dt, t_end);
  // Same seed: the same series, sample for sample; queries in any order give the same values.
  for (double t : {0.0, 0.25, 1234.5, 99999.75, 50.0}) CHECK((a.velocity_uvw(0.0, t) - b.velocity_uvw(0.0, t)).norm() == 0.0);
  const Eigen::Vector3d late = a.velocity_uvw(0.0, 777.7);
  a.velocity_uvw(0.0, 3.0);
  CHECK((a.velocity_uvw(0.0, 777.7) - late).norm() == 0.0);
  // Another seed: a different, uncorrelated series. Standard error of the correlation of two
  // independent series with rho = exp(-t/tau): sqrt(tau / T) = 0.016 here (tau = 5 s, T = 1e5 s).
  std::vector<double> ua, uc;
  for (double t = 0.0; t <= t_end; t += dt) {
    ua.push_back(a.velocity_uvw(0.0, t)(0));
    uc.push_back(c.velocity_uvw(0.0, t)(0));
  }
  CHECK(correlation(ua, uc, 0) == Approx(0.0).margin(4.0 * 0.016));
  double diff = 0.0;
  for (std::size_t k = 0; k < ua.size(); ++k) diff = std::max(diff, std::abs(ua[k] - uc[k]));
  CHECK(diff > 1.0);
  // Between samples a C2 cubic spline: at a sample (t = 10 s) the one-sided second differences
  // (step e = dt / 1000; a cubic's one-sided estimate is off by e times its third derivative,
  // about 1e-2 (m/s)/s^2 here) agree, where linear or Catmull-Rom interpolation would jump by
  // O(sigma / dt^2) = 8 (m/s)/s^2. And the spline is no straight line between samples.
  const double e = dt / 1000.0, tk = 10.0;
  auto y = [&](double t) { return a.velocity_uvw(0.0, t); };
  const Eigen::Vector3d left = (y(tk) - 2.0 * y(tk - e) + y(tk - 2.0 * e)) / (e * e);
  const Eigen::Vector3d right = (y(tk + 2.0 * e) - 2.0 * y(tk + e) + y(tk)) / (e * e);
  INFO("second derivative left of the sample " << left.transpose() << ", right " << right.transpose());
  CHECK((left - right).norm() < 0.1);
  const Eigen::Vector3d mid = y(10.25), y0 = y(10.0), y1 = y(10.5);
  CHECK((mid - 0.5 * (y0 + y1)).norm() > 1e-6);
  // Covers [0, duration]; outside throws.
  CHECK(a.end_s() >= t_end);
  CHECK_NOTHROW(a.velocity_uvw(0.0, t_end));
  CHECK_THROWS_AS(a.velocity_uvw(0.0, -0.1), std::out_of_range);
  CHECK_THROWS_AS(a.velocity_uvw(0.0, a.end_s() + 1.0), std::out_of_range);
}

TEST_CASE("Dryden turbulence: intensity between altitude stations", "[environment]") {
  // Stations at 0 m (sigma 1 m/s) and 1000 m (sigma 3 m/s), independent series. At 500 m the
  // variance must be the interpolated sigma^2 = 4 (m/s)^2, and the correlation with the series at
  // 0 m must be 0.5 / sqrt(0.5) = 0.7071 (the variance-preserving blend of the header).
  // Standard errors: variance 2.5 % with T = 1e5 s, tau = 5 s (u: sqrt(2 tau / T) = 1 %);
  // correlation about (1 - 0.707^2) sqrt(2 tau / T) = 0.5 %.
  const std::vector<DrydenStation> st = {station(0.0, 20.0, 1.0, 1.0, 1.0, 100.0, 100.0, 100.0),
                                         station(1000.0, 20.0, 3.0, 3.0, 3.0, 100.0, 100.0, 100.0)};
  const DrydenTurbulence d(st, 99, 0.5, 100000.0);
  std::vector<double> low, mid;
  double var_mid = 0.0;
  for (double t = 0.0; t <= 100000.0; t += 0.5) {
    low.push_back(d.velocity_uvw(0.0, t)(0));
    mid.push_back(d.velocity_uvw(500.0, t)(0));
    var_mid += mid.back() * mid.back();
  }
  var_mid /= static_cast<double>(mid.size());
  CHECK(var_mid == Approx(4.0).epsilon(4.0 * 0.01));
  CHECK(correlation(low, mid, 0) == Approx(std::sqrt(0.5)).margin(0.02));
  // Held outside the table.
  CHECK((d.velocity_uvw(-50.0, 123.0) - d.velocity_uvw(0.0, 123.0)).norm() == 0.0);
  CHECK((d.velocity_uvw(5000.0, 123.0) - d.velocity_uvw(1000.0, 123.0)).norm() == 0.0);
}

TEST_CASE("Dryden turbulence: MIL-F-8785C low-altitude helper and frame", "[environment]") {
  // MIL-F-8785C low-altitude model (recalled from memory): sigma_w = 0.1 W20 and L_w = h at every
  // height; at 1000 ft it becomes isotropic, L_u = L_v = L_w = 1000 ft, sigma_u = sigma_v = sigma_w.
  const double w20 = 15.4333;  // 30 kt, "moderate" [m/s]
  const DrydenStation top = DrydenTurbulence::mil_f_8785c_low_altitude(304.8, w20, 25.0);
  CHECK(top.sigma_w_m_s == Approx(0.1 * w20));
  CHECK(top.sigma_u_m_s == Approx(top.sigma_w_m_s));
  CHECK(top.sigma_v_m_s == Approx(top.sigma_w_m_s));
  CHECK(top.scale_u_m == Approx(304.8));
  CHECK(top.scale_w_m == Approx(304.8));
  const DrydenStation low = DrydenTurbulence::mil_f_8785c_low_altitude(30.48, w20, 25.0);
  CHECK(low.sigma_w_m_s == Approx(0.1 * w20));
  CHECK(low.scale_w_m == Approx(30.48));
  CHECK(low.sigma_u_m_s > low.sigma_w_m_s);  // near the ground the horizontal gusts are stronger
  CHECK(low.scale_u_m > low.scale_w_m);
  CHECK_THROWS(DrydenTurbulence::mil_f_8785c_low_altitude(500.0, w20, 25.0));
  // (u, v, w) -> ENU: with the wind from the west (blowing east), u is east, v (left) is north.
  const Eigen::Vector3d e = DrydenTurbulence::to_enu(Eigen::Vector3d(1.0, 2.0, 3.0), WindProfile::downwind_unit_enu(270.0));
  CHECK(e.x() == Approx(1.0));
  CHECK(e.y() == Approx(2.0));
  CHECK(e.z() == Approx(3.0));
}

// The interpolated series between samples: one station with V = 20 m/s, L = 20 m (tau = 1 s),
// sigma = 1 m/s, sampled coarsely at dt = tau / 2 so that what the spline does between samples
// stands well above the statistical noise; 2^18 samples (36 h).
namespace {
constexpr double kCoarseDt = 0.5, kCoarseTau = 1.0;
constexpr std::size_t kCoarseN = std::size_t(1) << 18;
const DrydenTurbulence& coarse_series() {
  static const DrydenTurbulence d({station(0.0, 20.0, 1.0, 1.0, 1.0, 20.0, 20.0, 20.0)}, 31337, kCoarseDt,
                                  kCoarseDt * static_cast<double>(kCoarseN - 1));
  return d;
}
}  // namespace

TEST_CASE("Dryden turbulence: variance between samples follows the spline's formula", "[environment]") {
  // Expected variance / sigma^2 at a sample (s = 0), a quarter and half-way between samples, from
  // the analytic Dryden correlations and the cardinal spline (helpers above). At dt = tau / 2
  // half-way: u 0.9326, v and w 0.9011 (linear interpolation would give 0.80 and 0.73; both
  // computed from the same sums with numpy while writing this test). Statistical error of a
  // variance over T = 1.3e5 s (Bartlett, header of this file): u sqrt(2 tau / T) = 0.39 %,
  // v sqrt(1.25 tau / T) = 0.31 %.
  const DrydenTurbulence& d = coarse_series();
  const double t_total = kCoarseDt * static_cast<double>(kCoarseN - 1);
  for (double s : {0.0, 0.25, 0.5}) {
    Eigen::Vector3d var = Eigen::Vector3d::Zero();
    std::size_t count = 0;
    for (std::size_t k = 0; k + 1 < kCoarseN; ++k, ++count) {
      const Eigen::Vector3d y = d.velocity_uvw(0.0, (static_cast<double>(k) + s) * kCoarseDt);
      var += y.cwiseProduct(y);
    }
    var /= static_cast<double>(count);
    const double eu = spline_variance_ratio([](double t) { return rho_u(t, kCoarseTau); }, s, kCoarseDt);
    const double ev = spline_variance_ratio([](double t) { return rho_v(t, kCoarseTau); }, s, kCoarseDt);
    const double sd_u = std::sqrt(2.0 * kCoarseTau / t_total), sd_v = std::sqrt(1.25 * kCoarseTau / t_total);
    INFO("s = " << s << ": variance " << var.transpose() << ", expected u " << eu << ", v and w " << ev);
    CHECK(var(0) == Approx(eu).margin(4.0 * sd_u));
    CHECK(var(1) == Approx(ev).margin(4.0 * sd_v));
    CHECK(var(2) == Approx(ev).margin(4.0 * sd_v));
  }
  // The formula: 1 at a sample (the spline keeps the exact samples), and the half-way values above.
  const auto ru = [](double t) { return rho_u(t, kCoarseTau); };
  const auto rv = [](double t) { return rho_v(t, kCoarseTau); };
  CHECK(spline_variance_ratio(ru, 0.0, kCoarseDt) == Approx(1.0).margin(1e-12));
  CHECK(spline_variance_ratio(ru, 0.5, kCoarseDt) == Approx(0.9326).margin(1e-4));
  CHECK(spline_variance_ratio(rv, 0.5, kCoarseDt) == Approx(0.9011).margin(1e-4));
}

TEST_CASE("Dryden turbulence: spectrum of the interpolated series", "[environment]") {
  // The series read at 16 points per sample interval (fs' = 32 Hz; sample rate fs = 2 Hz). Its
  // phase-averaged one-sided spectrum must be the Dryden form aliased by the sampling and shaped
  // by the spline (sampling theory, Poisson's sum; L^ above):
  //   S_int(f) = |L^(f)|^2 sum_n S_Dryden(|f + n fs|)   (n over all integers),
  // near the Dryden form at low f, raised by the aliased power toward fs/4 (by 1.2), down to
  // 0.6 of it at fs/2, and below 0.3 % of it beyond 0.75 fs: no spurious images above the
  // sampling band, unlike linear interpolation (9 % at 0.75 fs, 4.5 % at 1.5 fs).
  // Welch bands and tolerances as in the spectrum test above.
  const DrydenTurbulence& d = coarse_series();
  const std::size_t per = 16, n = (kCoarseN / 2) * per;  // 18 h of the series, 2,097,152 points
  const double h = kCoarseDt / static_cast<double>(per), fs_read = 1.0 / h, fs = 1.0 / kCoarseDt;
  std::vector<Eigen::Vector3d> y(n);
  for (std::size_t k = 0; k < n; ++k) y[k] = d.velocity_uvw(0.0, h * static_cast<double>(k));
  const std::size_t nfft = 4096;
  const double df = fs_read / static_cast<double>(nfft);
  auto dryden = [](int c, double f) { return c == 0 ? dryden_u(1.0, kCoarseTau, f) : dryden_v(1.0, kCoarseTau, f); };
  auto predicted = [&](int c, double f) {
    double sum = 0.0;  // terms fall as 1/n^2: the cut at |n| = 20000 leaves < 1e-4 of the sum
    for (int m = -20000; m <= 20000; ++m) sum += dryden(c, std::abs(f + m * fs));
    const double l = spline_response(f, kCoarseDt);
    return l * l * sum;
  };
  const double bands[] = {0.02, 0.06, 0.125, 0.25, 0.4, 0.5, 0.6};  // in units of fs
  for (int c = 0; c < 3; ++c) {
    std::size_t segments = 0;
    const std::vector<double> p = welch(component(y, c), nfft, fs_read, segments);
    for (std::size_t b = 0; b + 1 < sizeof(bands) / sizeof(bands[0]); ++b) {
      const auto k0 = static_cast<std::size_t>(std::ceil(bands[b] * fs / df));
      const auto k1 = static_cast<std::size_t>(std::floor(bands[b + 1] * fs / df));
      double est = 0.0, ana = 0.0, dry = 0.0;
      for (std::size_t k = k0; k <= k1; ++k) {
        const double f = df * static_cast<double>(k);
        est += p[k];
        ana += predicted(c, f);
        dry += dryden(c, f);
      }
      const double m = static_cast<double>(k1 - k0 + 1);
      const double rel_var = 1.056 / segments * (m + 2.0 * (m - 1.0) * 4.0 / 9.0 + 2.0 * std::max(m - 2.0, 0.0) / 36.0) / (m * m);
      const double tol = 4.0 * std::sqrt(rel_var) + 0.015;
      INFO("component " << c << ", f / fs in [" << bands[b] << ", " << bands[b + 1] << "]: estimate / predicted = "
                        << est / ana << " (tolerance " << tol << "); predicted / Dryden = " << ana / dry);
      CHECK(std::abs(est / ana - 1.0) < tol);
    }
    // From 0.8 fs to 1.5 fs the spline leaves under 1 % of the Dryden level.
    const auto k0 = static_cast<std::size_t>(std::ceil(0.8 * fs / df));
    const auto k1 = static_cast<std::size_t>(std::floor(1.5 * fs / df));
    double est = 0.0, dry = 0.0;
    for (std::size_t k = k0; k <= k1; ++k) {
      est += p[k];
      dry += dryden(c, df * static_cast<double>(k));
    }
    INFO("component " << c << ", f / fs in [0.8, 1.5]: estimate / Dryden = " << est / dry);
    CHECK(est / dry < 0.01);
  }
}
