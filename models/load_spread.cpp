#include "models/load_spread.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace hawser {

namespace {
double cdf(double t) {  // P(t)
  t = std::min(1.0, std::max(-1.0, t));
  const double t2 = t * t;
  return 0.5 + 15.0 / 16.0 * t * (1.0 - 2.0 * t2 / 3.0 + t2 * t2 / 5.0);
}
double moment(double t) {  // Q(t)
  if (std::abs(t) >= 1.0) return 0.0;
  const double c = 1.0 - t * t;
  return -5.0 / 32.0 * c * c * c;
}
double density_a(double t) {  // a rho(a t)
  if (std::abs(t) >= 1.0) return 0.0;
  const double c = 1.0 - t * t;
  return 15.0 / 16.0 * c * c;
}
}  // namespace

LoadSpreader::LoadSpreader(std::vector<double> s_nodes, LoadSpread kind, double half_width_elements)
    : s_(std::move(s_nodes)), kind_(kind) {
  if (s_.size() < 2) throw std::invalid_argument("LoadSpreader: fewer than two nodes");
  double shortest = s_[1] - s_[0];
  for (std::size_t k = 1; k + 1 < s_.size(); ++k) shortest = std::min(shortest, s_[k + 1] - s_[k]);
  // 2a <= 3 shortest elements keeps the window on at most 8 nodes (kMaxNodes).
  if (kind_ == LoadSpread::smooth && !(half_width_elements > 0.0 && half_width_elements <= 3.0))
    throw std::invalid_argument("LoadSpreader: the half width must lie in (0, 3] elements");
  a_ = half_width_elements * shortest;
}

SpreadWeights LoadSpreader::at(double s, std::size_t element) const {
  SpreadWeights out;
  const std::size_t n_el = s_.size() - 1;
  if (kind_ == LoadSpread::point) {
    const double len = s_[element + 1] - s_[element];
    const double xi = std::min(1.0, std::max(0.0, (s - s_[element]) / len));
    out.first = element;
    out.count = 2;
    out.w[0] = 1.0 - xi, out.w[1] = xi;
    out.dw[0] = -1.0 / len, out.dw[1] = 1.0 / len;
    return out;
  }
  const double a = a_, lo = s - a, hi = s + a;
  // Elements the window touches; beyond the ends, the end elements continued.
  auto elem = [&](double x) {
    const long e = static_cast<long>(std::upper_bound(s_.begin(), s_.end(), x) - s_.begin()) - 1;
    const long last = static_cast<long>(n_el) - 1;
    return static_cast<std::size_t>(std::min<long>(std::max<long>(e, 0), last));
  };
  const std::size_t e0 = elem(lo), e1 = elem(hi);
  out.first = e0;
  out.count = e1 - e0 + 2;
  for (std::size_t e = e0; e <= e1; ++e) {
    const double p = e == 0 ? lo : std::max(lo, s_[e]);
    const double q = e == n_el - 1 ? hi : std::min(hi, s_[e + 1]);
    if (!(q > p)) continue;
    const double len = s_[e + 1] - s_[e];
    const double tp = (p - s) / a, tq = (q - s) / a;
    const double dp = cdf(tq) - cdf(tp), dq = moment(tq) - moment(tp);
    const double dr = (density_a(tp) - density_a(tq)) / a;  // rho(p - s) - rho(q - s)
    // phi_e = (s_{e+1} - sigma) / len, phi_{e+1} = (sigma - s_e) / len on this element.
    const double alpha[2] = {s_[e + 1] / len, -s_[e] / len}, beta[2] = {-1.0 / len, 1.0 / len};
    for (int r = 0; r < 2; ++r) {
      const std::size_t i = e + r - e0;
      out.w[i] += (alpha[r] + beta[r] * s) * dp + beta[r] * a * dq;
      out.dw[i] += beta[r] * dp;
      out.ddw[i] += beta[r] * dr;
    }
  }
  return out;
}

}  // namespace hawser
