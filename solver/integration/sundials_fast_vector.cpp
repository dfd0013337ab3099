#include "solver/integration/sundials_fast_vector.hpp"

#include <nvector/nvector_serial.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

#include "solver/integration/sundials_compat.hpp"

namespace hawser::sundials {
namespace {

// The hottest loops are compiled twice, for AVX2 and for the baseline x86-64 (GCC's
// function multi-versioning picks one at load time), so the program still runs on any x86-64.
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
#define HAWSER_VECTOR_CLONES __attribute__((target_clones("avx2", "default")))
#else
#define HAWSER_VECTOR_CLONES
#endif

inline double* d(N_Vector v) { return NV_DATA_S(v); }
inline sunindextype n(N_Vector v) { return NV_LENGTH_S(v); }

HAWSER_VECTOR_CLONES void linear_sum(real a, N_Vector x, real b, N_Vector y, N_Vector z) {
  const double *xd = d(x), *yd = d(y);
  double* zd = d(z);
  const sunindextype len = n(x);
  for (sunindextype i = 0; i < len; ++i) zd[i] = a * xd[i] + b * yd[i];
}
void constant(real c, N_Vector z) { std::fill(d(z), d(z) + n(z), c); }
void prod(N_Vector x, N_Vector y, N_Vector z) {
  const double *xd = d(x), *yd = d(y);
  double* zd = d(z);
  for (sunindextype i = 0, len = n(x); i < len; ++i) zd[i] = xd[i] * yd[i];
}
void div(N_Vector x, N_Vector y, N_Vector z) {
  const double *xd = d(x), *yd = d(y);
  double* zd = d(z);
  for (sunindextype i = 0, len = n(x); i < len; ++i) zd[i] = xd[i] / yd[i];
}
HAWSER_VECTOR_CLONES void scale(real c, N_Vector x, N_Vector z) {
  const double* xd = d(x);
  double* zd = d(z);
  for (sunindextype i = 0, len = n(x); i < len; ++i) zd[i] = c * xd[i];
}
HAWSER_VECTOR_CLONES void absolute(N_Vector x, N_Vector z) {
  const double* xd = d(x);
  double* zd = d(z);
  for (sunindextype i = 0, len = n(x); i < len; ++i) zd[i] = std::abs(xd[i]);
}
HAWSER_VECTOR_CLONES void inverse(N_Vector x, N_Vector z) {
  const double* xd = d(x);
  double* zd = d(z);
  for (sunindextype i = 0, len = n(x); i < len; ++i) zd[i] = 1.0 / xd[i];
}
void add_const(N_Vector x, real b, N_Vector z) {
  const double* xd = d(x);
  double* zd = d(z);
  for (sunindextype i = 0, len = n(x); i < len; ++i) zd[i] = xd[i] + b;
}
// Sums keep 16 partial sums (four AVX2 registers) so that the additions form four
// independent chains rather than one: a single chain runs at the adder's latency, not its
// throughput. The result differs from the serial sum only in rounding.
constexpr int kLanes = 16;

/// sum_i term(i) for i < len, in kLanes partial sums; inlined into each caller's clone.
template <class Term>
inline __attribute__((always_inline)) double lane_sum(sunindextype len, Term term) {
  double acc[kLanes] = {};
  sunindextype i = 0;
  for (; i + kLanes <= len; i += kLanes)
    for (int j = 0; j < kLanes; ++j) acc[j] += term(i + j);
  double s = 0.0;
  for (; i < len; ++i) s += term(i);
  for (double a : acc) s += a;
  return s;
}

HAWSER_VECTOR_CLONES real dot(N_Vector x, N_Vector y) {
  const double *xd = d(x), *yd = d(y);
  return lane_sum(n(x), [=](sunindextype i) { return xd[i] * yd[i]; });
}
real max_norm(N_Vector x) {
  const double* xd = d(x);
  double m = 0.0;
  const sunindextype len = n(x);
#pragma omp simd reduction(max : m)
  for (sunindextype i = 0; i < len; ++i) m = std::max(m, std::abs(xd[i]));
  return m;
}
HAWSER_VECTOR_CLONES real wsqr_sum(N_Vector x, N_Vector w) {
  const double *xd = d(x), *wd = d(w);
  return lane_sum(n(x), [=](sunindextype i) {
    const double p = xd[i] * wd[i];
    return p * p;
  });
}
real wsqr_sum_mask(N_Vector x, N_Vector w, N_Vector id) {
  const double *xd = d(x), *wd = d(w), *md = d(id);
  double s = 0.0;
  for (sunindextype i = 0, len = n(x); i < len; ++i)
    if (md[i] > 0.0) {
      const double p = xd[i] * wd[i];
      s += p * p;
    }
  return s;
}
real wrms_norm(N_Vector x, N_Vector w) { return std::sqrt(wsqr_sum(x, w) / n(x)); }
real wrms_norm_mask(N_Vector x, N_Vector w, N_Vector id) {
  return std::sqrt(wsqr_sum_mask(x, w, id) / n(x));
}
real min_value(N_Vector x) {
  const double* xd = d(x);
  double m = xd[0];
  for (sunindextype i = 1, len = n(x); i < len; ++i) m = std::min(m, xd[i]);
  return m;
}
real wl2_norm(N_Vector x, N_Vector w) { return std::sqrt(wsqr_sum(x, w)); }
real l1_norm(N_Vector x) {
  const double* xd = d(x);
  double s = 0.0;
  const sunindextype len = n(x);
#pragma omp simd reduction(+ : s)
  for (sunindextype i = 0; i < len; ++i) s += std::abs(xd[i]);
  return s;
}
void compare(real c, N_Vector x, N_Vector z) {
  const double* xd = d(x);
  double* zd = d(z);
  for (sunindextype i = 0, len = n(x); i < len; ++i) zd[i] = std::abs(xd[i]) >= c ? 1.0 : 0.0;
}
boolean inv_test(N_Vector x, N_Vector z) {
  const double* xd = d(x);
  double* zd = d(z);
  bool ok = true;
  for (sunindextype i = 0, len = n(x); i < len; ++i) {
    if (xd[i] == 0.0)
      ok = false;
    else
      zd[i] = 1.0 / xd[i];
  }
  return ok ? SUNTRUE : SUNFALSE;
}
// z = sum_k c_k x_k over up to four vectors at once (accumulate: z += ...), one pass over z.
// z may be x[0] (SUNDIALS allows it): each z[i] is read before it is written.
template <int M>
inline __attribute__((always_inline)) void combine(const real* c, N_Vector* x, double* zd, sunindextype len,
                                                   bool accumulate) {
  const double* xk[M];
  double ck[M];
  for (int k = 0; k < M; ++k) {
    xk[k] = d(x[k]);
    ck[k] = c[k];
  }
  if (accumulate) {
    for (sunindextype i = 0; i < len; ++i) {
      double s = zd[i];
      for (int k = 0; k < M; ++k) s += ck[k] * xk[k][i];
      zd[i] = s;
    }
  } else {
    for (sunindextype i = 0; i < len; ++i) {
      double s = ck[0] * xk[0][i];
      for (int k = 1; k < M; ++k) s += ck[k] * xk[k][i];
      zd[i] = s;
    }
  }
}

HAWSER_VECTOR_CLONES int linear_combination(int nv, real* c, N_Vector* x, N_Vector z) {
  // Four vectors per pass: ARKODE's stage sums combine up to a dozen vectors, and a pass per
  // vector made them the largest cost after the Newton solve.
  const sunindextype len = n(z);
  double* zd = d(z);
  for (int k = 0; k < nv; k += 4) {
    const bool accumulate = k > 0;
    switch (std::min(4, nv - k)) {
      case 1: combine<1>(c + k, x + k, zd, len, accumulate); break;
      case 2: combine<2>(c + k, x + k, zd, len, accumulate); break;
      case 3: combine<3>(c + k, x + k, zd, len, accumulate); break;
      default: combine<4>(c + k, x + k, zd, len, accumulate); break;
    }
  }
  return kSuccess;
}
HAWSER_VECTOR_CLONES int scale_add_multi(int nv, real* a, N_Vector x, N_Vector* y, N_Vector* z) {
  const double* xd = d(x);
  const sunindextype len = n(x);
  for (int k = 0; k < nv; ++k) {
    const double* yd = d(y[k]);
    double* zd = d(z[k]);
    const double ak = a[k];
    for (sunindextype i = 0; i < len; ++i) zd[i] = ak * xd[i] + yd[i];
  }
  return kSuccess;
}
int dot_prod_multi(int nv, N_Vector x, N_Vector* y, real* out) {
  for (int k = 0; k < nv; ++k) out[k] = dot(x, y[k]);
  return kSuccess;
}
int linear_sum_array(int nv, real a, N_Vector* x, real b, N_Vector* y, N_Vector* z) {
  for (int k = 0; k < nv; ++k) linear_sum(a, x[k], b, y[k], z[k]);
  return kSuccess;
}
int scale_array(int nv, real* c, N_Vector* x, N_Vector* z) {
  for (int k = 0; k < nv; ++k) scale(c[k], x[k], z[k]);
  return kSuccess;
}
int const_array(int nv, real c, N_Vector* z) {
  for (int k = 0; k < nv; ++k) constant(c, z[k]);
  return kSuccess;
}
int wrms_norm_array(int nv, N_Vector* x, N_Vector* w, real* out) {
  for (int k = 0; k < nv; ++k) out[k] = wrms_norm(x[k], w[k]);
  return kSuccess;
}
int wrms_norm_mask_array(int nv, N_Vector* x, N_Vector* w, N_Vector id, real* out) {
  for (int k = 0; k < nv; ++k) out[k] = wrms_norm_mask(x[k], w[k], id);
  return kSuccess;
}
int scale_add_multi_array(int nv, int ns, real* a, N_Vector* x, N_Vector** y, N_Vector** z) {
  // z[j][i] = a[j] * x[i] + y[j][i]  (nvector_serial.c, 6.4)
  for (int i = 0; i < nv; ++i) {
    const double* xd = d(x[i]);
    const sunindextype len = n(x[i]);
    for (int j = 0; j < ns; ++j) {
      const double* yd = d(y[j][i]);
      double* zd = d(z[j][i]);
      for (sunindextype k = 0; k < len; ++k) zd[k] = a[j] * xd[k] + yd[k];
    }
  }
  return kSuccess;
}
int linear_combination_array(int nv, int ns, real* c, N_Vector** x, N_Vector* z) {
  // z[i] = sum_j c[j] * x[j][i]
  std::vector<N_Vector> column(static_cast<std::size_t>(ns));
  for (int i = 0; i < nv; ++i) {
    for (int j = 0; j < ns; ++j) column[j] = x[j][i];
    linear_combination(ns, c, column.data(), z[i]);
  }
  return kSuccess;
}

}  // namespace

HAWSER_VECTOR_CLONES bool all_finite(N_Vector v) {
  // 0 * x is 0 for finite x and NaN otherwise, and NaN survives any sum.
  const double* vd = d(v);
  return lane_sum(n(v), [=](sunindextype i) { return 0.0 * vd[i]; }) == 0.0;
}

namespace {
// w_i = 1 / (rtol |y_i| + a_i) with a_i = atol[i * stride] (stride 0: one value); returns
// the smallest denominator. A NaN entry is skipped by the minimum, as in the library's N_VMin.
template <int kStride>
inline __attribute__((always_inline)) double weights_pass(const double* yd, double rtol, const double* atol,
                                                          double* wd, sunindextype len) {
  double smallest = std::numeric_limits<double>::max();
#pragma omp simd reduction(min : smallest)
  for (sunindextype i = 0; i < len; ++i) {
    const double den = rtol * std::abs(yd[i]) + atol[i * kStride];
    smallest = den < smallest ? den : smallest;
    wd[i] = 1.0 / den;
  }
  return smallest;
}
}  // namespace

// One pass instead of the library's four (abs, scale/sum, min, inverse).
HAWSER_VECTOR_CLONES bool error_weights(N_Vector y, double rtol, const double* atol, bool one_atol,
                                        N_Vector w) {
  const double smallest = one_atol ? weights_pass<0>(d(y), rtol, atol, d(w), n(y))
                                   : weights_pass<1>(d(y), rtol, atol, d(w), n(y));
  return smallest > 0.0;
}

void install_fast_serial_ops(N_Vector v) {
  N_Vector_Ops o = v->ops;
  o->nvlinearsum = linear_sum;
  o->nvconst = constant;
  o->nvprod = prod;
  o->nvdiv = div;
  o->nvscale = scale;
  o->nvabs = absolute;
  o->nvinv = inverse;
  o->nvaddconst = add_const;
  o->nvdotprod = dot;
  o->nvmaxnorm = max_norm;
  o->nvwrmsnorm = wrms_norm;
  o->nvwrmsnormmask = wrms_norm_mask;
  o->nvmin = min_value;
  o->nvwl2norm = wl2_norm;
  o->nvl1norm = l1_norm;
  o->nvcompare = compare;
  o->nvinvtest = inv_test;
  o->nvlinearcombination = linear_combination;
  o->nvscaleaddmulti = scale_add_multi;
  o->nvdotprodmulti = dot_prod_multi;
  o->nvlinearsumvectorarray = linear_sum_array;
  o->nvscalevectorarray = scale_array;
  o->nvconstvectorarray = const_array;
  o->nvwrmsnormvectorarray = wrms_norm_array;
  o->nvwrmsnormmaskvectorarray = wrms_norm_mask_array;
  o->nvscaleaddmultivectorarray = scale_add_multi_array;
  o->nvlinearcombinationvectorarray = linear_combination_array;
  o->nvdotprodlocal = dot;
  o->nvmaxnormlocal = max_norm;
  o->nvminlocal = min_value;
  o->nvl1normlocal = l1_norm;
  o->nvinvtestlocal = inv_test;
  o->nvwsqrsumlocal = wsqr_sum;
  o->nvwsqrsummasklocal = wsqr_sum_mask;
}

}  // namespace hawser::sundials
