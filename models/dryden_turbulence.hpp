#pragma once
// Continuous turbulence with the Dryden spectra (MIL-F-8785C, section 3.7.3; the same forms in
// MIL-HDBK-1797), pre-generated as a reproducible time series at a few altitude stations.
//
// Spectra, one-sided in the spatial frequency Omega >= 0 [rad/m], each integrating to sigma^2:
//   Phi_u(Omega) = sigma_u^2 (2 L_u / pi) / (1 + (L_u Omega)^2)                       (along-wind)
//   Phi_v(Omega) = sigma_v^2 (L_v / pi) (1 + 3 (L_v Omega)^2) / (1 + (L_v Omega)^2)^2  (cross-wind)
//   Phi_w: as Phi_v with sigma_w, L_w                                                   (vertical)
// (This is the MIL-F-8785C way of writing the lateral forms; MIL-HDBK-1797 writes them with 2L,
// so its lateral and vertical scale lengths are half of these; recalled from memory.)
// Frozen turbulence carried past a fixed point by the mean wind V (Taylor's hypothesis):
// omega = V Omega [rad/s] and Phi(omega) = Phi(Omega) / V. With tau = L / V these are the outputs
// of the standard shaping filters driven by white noise,
//   H_u(s) ~ 1 / (1 + tau_u s),   H_v(s) ~ (1 + sqrt(3) tau_v s) / (1 + tau_v s)^2,
// and the gain is fixed here by requiring the output variance to be sigma^2 (which sidesteps the
// one-sided / two-sided, 1/pi bookkeeping of the filter gains: the MIL-F-8785C gains
// sigma sqrt(2 L / (pi V)) and sigma sqrt(L / (pi V)) give sigma^2 for white noise of one-sided
// spectral density 1 per rad/s).
//
// Realisation (exact, not an Euler step): each filter is a linear stochastic differential
// equation dx = A x dt + B dW, in time scaled by 1/tau (a = 1):
//   u:     A = -1, B = sqrt(2) (stationary variance 1), y = x;
//   v, w:  A = [[-1, 1], [0, -1]], B = [0, 1]^T, y = C x, C = [1 - sqrt(3), sqrt(3)],
//          stationary covariance P = [[1/4, 1/4], [1/4, 1/2]], so C P C^T = 1.
// Sampled every dt, x_{k+1} = Phi x_k + eta_k with Phi = exp(A h), h = dt / tau, and eta_k
// Gaussian with covariance Q = integral_0^h exp(A s) B B^T exp(A^T s) ds (closed form, with a
// series for small h); x_0 is drawn from P. The samples therefore have EXACTLY the joint
// distribution of the continuous process at the sample times (stationary from t = 0), for any dt.
// Between samples the series is interpolated by the C2 cubic spline through the samples (the
// only approximation; the samples themselves are kept exactly). Why not linearly: the air's
// velocity drives the acceleration of the light lower nodes, and the error test of BDF2 sees
// about h^3 times the third derivative of their velocity, i.e. the second time derivative of
// the wind. Linear interpolation makes that a train of spikes (a kink at every sample), and the
// integrator cut its steps at each; among all interpolants through the samples the cubic spline
// has the least integral of (u'')^2 (Holladay's theorem; de Boor, A Practical Guide to Splines,
// 1978, recalled from memory), so no other keeps the same samples with a smoother u''.
// Spline: with b = (t - t_k) / dt, a = 1 - b and m_j = dt^2 u''(t_j) / 6,
//   u(t) = a u_k + b u_{k+1} + (a^3 - a) m_k + (b^3 - b) m_{k+1},
//   m_{j-1} + 4 m_j + m_{j+1} = u_{j+1} - 2 u_j + u_{j-1},
// natural (m = 0) at t = 0 and kPad = 32 samples past the end of the series, where it is cut
// (an end's effect falls by 2 - sqrt(3) = 0.27 per sample: below 1e-3 after 5 samples, 1e-18
// after 32). Away from t = 0 this is the cardinal cubic spline u(t) = sum_j u_j L(t/dt - j),
// L(x) = sum_k sqrt(3) (sqrt(3) - 2)^|k| beta3(x - k), with Fourier transform
// L^(f) = sinc^4(pi f dt) / (1 - (2/3) sin^2(pi f dt)) (Unser, IEEE Signal Processing Magazine
// 16(6), 1999; recalled from memory). What it does to the statistics:
//  - Variance at t = (k + s) dt: sigma^2 sum_j sum_l L(s - j) L(s - l) rho((j - l) dt), with
//    rho_u(t) = exp(-|t|/tau) and rho_v(t) = (1 - |t|/(2 tau)) exp(-|t|/tau) the Dryden
//    correlations. It is sigma^2 at the samples and least half-way between them; as fractions of
//    sigma^2 (half-way / averaged over s), u and v:
//      dt = tau/10: 0.986 / 0.993 and 0.979 / 0.989   (linear: 0.952 / 0.968, 0.930 / 0.953)
//      dt = tau/5:  0.972 / 0.986 and 0.959 / 0.979   (linear: 0.909 / 0.940, 0.868 / 0.912)
//      dt = tau/4:  0.965 / 0.982 and 0.948 / 0.973   (linear: 0.889 / 0.926, 0.841 / 0.894)
//    (the spline at tau/4 keeps more variance than linear interpolation did at tau/10).
//  - Spectrum (averaged over s): |L^(f)|^2 sum_n Phi(f + n / dt), the Dryden form aliased by the
//    sampling and shaped by the spline. Relative to the Dryden form, nearly the same for any
//    dt << tau: 1.05 at f = 1/(8 dt), 1.2 at 1/(4 dt) (the aliased power of the f^-2 tail),
//    0.6 at the Nyquist frequency 1/(2 dt), 0.002 at 3/(4 dt), and nothing of note above
//    (linear interpolation: 0.95, 0.81, 0.41, then spurious images of 9 % at 3/(4 dt) and
//    4.5 % at 3/(2 dt)). So the Dryden form is followed up to about 1/(8 dt), and the spectrum
//    is cut at 1/(2 dt) to 3/(4 dt). Choose dt <= tau/4 for the smallest tau of the stations.
//
// Altitude: a table of stations (strictly increasing altitude), each with its own V, sigmas and
// scale lengths and its own independent unit-variance series n_c,i(t) (c = u, v, w). At altitude
// h between stations i and i+1, with weight w = (h - h_i) / (h_{i+1} - h_i),
//   y_c(h, t) = sigma_c(h) [(1 - w) n_c,i(t) + w n_c,i+1(t)] / sqrt((1 - w)^2 + w^2),
// sigma_c(h) linear in h. The variance is sigma_c(h)^2 at every altitude; at a station the series
// is that station's Dryden process; in between it blends the two spectra. Stations are
// independent, so the station spacing acts as the vertical correlation length of the
// turbulence: space stations about one scale length apart. Outside the table the nearest
// station is held (give a station with sigma = 0 to end the turbulence).
//
// Output components: (u, v, w) = (along the mean wind, horizontal to its left, up) [m/s];
// to_enu() turns them into (east, north, up) given the local downwind direction.
// Time: t in [0, duration] (the series covers at least that); outside, std::out_of_range.
// Reproducibility: one std::mt19937_64 per station, seeded with std::seed_seq{seed bits, station}
// (both fully specified by the C++ standard); the Gaussian draws use Box-Muller written here
// rather than std::normal_distribution, whose output differs between standard libraries. The
// series is then the same on every platform up to the last-bit rounding of std::log/cos/sin.
// Memory: 6 doubles per sample per station, the samples and their m_j (a day at dt = 1 s:
// 4 MB per station).
//
// MIL-F-8785C low-altitude model (h below 1000 ft), offered ONLY as an explicit helper
// (mil_f_8785c_low_altitude), never as a default; h in ft (recalled from memory):
//   L_w = h,  L_u = L_v = h / (0.177 + 0.000823 h)^1.2,
//   sigma_w = 0.1 W20,  sigma_u = sigma_v = sigma_w / (0.177 + 0.000823 h)^0.4,
// W20 the wind speed at 20 ft (light 15 kt, moderate 30 kt, severe 45 kt).
#include <Eigen/Core>
#include <cstdint>
#include <vector>

namespace hawser {

struct DrydenStation {
  double altitude_m;       // [m]
  double mean_speed_m_s;   // V, mean wind carrying the turbulence [m/s], > 0
  double sigma_u_m_s;      // along-wind intensity [m/s], >= 0
  double sigma_v_m_s;      // cross-wind intensity [m/s], >= 0
  double sigma_w_m_s;      // vertical intensity [m/s], >= 0
  double scale_u_m;        // L_u [m], > 0
  double scale_v_m;        // L_v [m], > 0
  double scale_w_m;        // L_w [m], > 0
};

class DrydenTurbulence {
 public:
  /// Generates the series of every station on [0, duration] at interval dt [s].
  DrydenTurbulence(std::vector<DrydenStation> stations, std::uint64_t seed, double sample_interval_s,
                   double duration_s);

  /// Turbulent velocity (u along-wind, v cross-wind to the left, w up) [m/s] at altitude h [m]
  /// and time t [s] (the spline between samples); deterministic, any order of calls.
  Eigen::Vector3d velocity_uvw(double altitude_m, double t_s) const;
  /// (u, v, w) -> (east, north, up), given the horizontal downwind unit vector (east, north, 0).
  static Eigen::Vector3d to_enu(const Eigen::Vector3d& uvw, const Eigen::Vector3d& downwind_unit_enu);

  /// The MIL-F-8785C low-altitude station at h [m] (3.048 m to 304.8 m, i.e. 10 to 1000 ft) for a
  /// wind W20 [m/s] at 20 ft and a mean speed V [m/s] (see above).
  static DrydenStation mil_f_8785c_low_altitude(double altitude_m, double wind_speed_20ft_m_s,
                                                double mean_speed_m_s);

  double sample_interval_s() const { return dt_; }
  /// Time covered by the series [s] (>= the requested duration).
  double end_s() const { return dt_ * static_cast<double>(samples_ - 1); }
  std::size_t samples() const { return samples_; }
  const std::vector<DrydenStation>& stations() const { return stations_; }

 private:
  // Per sample (column): unit-variance (u, v, w), then m = dt^2 y'' / 6 of the spline (u, v, w).
  using Series = Eigen::Matrix<double, 6, Eigen::Dynamic>;
  static constexpr std::size_t kPad = 32;  // samples generated past end_s() (spline end far away)
  static void fit_spline(Series& s);
  Eigen::Vector3d unit_sample(std::size_t station, double t_s) const;
  Eigen::Vector3d held(std::size_t station, double t_s) const;  // sigma * unit_sample of one station
  std::vector<DrydenStation> stations_;
  std::vector<Series> series_;
  double dt_;
  std::size_t samples_;
};

}  // namespace hawser
