// The compiled vector arithmetic (solver/integration/sundials_fast_vector.hpp) against SUNDIALS' own
// serial implementation, operation by operation, on the same random data.
#include "catch_compat.hpp"

#include <nvector/nvector_serial.h>
#include <sundials/sundials_context.h>

#include <limits>
#include <random>
#include <vector>

#include "solver/integration/sundials_compat.hpp"
#include "solver/integration/sundials_fast_vector.hpp"

namespace {
struct Vectors {
  SUNContext ctx = nullptr;
  std::vector<N_Vector> ref, fast;  // same data; ref keeps the library's operations
  Vectors(int count, sunindextype n) {
    hawser::sundials::create_context(&ctx);
    std::mt19937 rng(5);
    std::uniform_real_distribution<double> u(-2.0, 2.0);
    for (int k = 0; k < count; ++k) {
      ref.push_back(N_VNew_Serial(n, ctx));
      fast.push_back(N_VNew_Serial(n, ctx));
      hawser::sundials::install_fast_serial_ops(fast.back());
      for (sunindextype i = 0; i < n; ++i) NV_Ith_S(ref[k], i) = NV_Ith_S(fast[k], i) = u(rng);
    }
    for (sunindextype i = 0; i < n; i += 7) NV_Ith_S(ref[3], i) = NV_Ith_S(fast[3], i) = -1.0;  // a mask with holes
  }
  ~Vectors() {
    for (auto v : ref) N_VDestroy(v);
    for (auto v : fast) N_VDestroy(v);
    SUNContext_Free(&ctx);
  }
  void same(int k) const {
    for (sunindextype i = 0; i < NV_LENGTH_S(ref[k]); ++i) REQUIRE(NV_Ith_S(fast[k], i) == Approx(NV_Ith_S(ref[k], i)).epsilon(1e-14));
  }
};
}  // namespace

TEST_CASE("compiled vector operations agree with SUNDIALS' serial vector", "[integrator][vector]") {
  Vectors v(6, 1001);
  auto& r = v.ref;
  auto& f = v.fast;
  N_VLinearSum(0.3, r[0], -1.7, r[1], r[5]);
  N_VLinearSum(0.3, f[0], -1.7, f[1], f[5]);
  v.same(5);
  N_VProd(r[0], r[1], r[5]);
  N_VProd(f[0], f[1], f[5]);
  v.same(5);
  N_VDiv(r[0], r[1], r[5]);
  N_VDiv(f[0], f[1], f[5]);
  v.same(5);
  N_VScale(2.5, r[2], r[5]);
  N_VScale(2.5, f[2], f[5]);
  v.same(5);
  N_VAbs(r[2], r[5]);
  N_VAbs(f[2], f[5]);
  v.same(5);
  N_VInv(r[2], r[5]);
  N_VInv(f[2], f[5]);
  v.same(5);
  N_VAddConst(r[2], 0.25, r[5]);
  N_VAddConst(f[2], 0.25, f[5]);
  v.same(5);
  N_VCompare(0.5, r[2], r[5]);
  N_VCompare(0.5, f[2], f[5]);
  v.same(5);
  CHECK(N_VDotProd(f[0], f[1]) == Approx(N_VDotProd(r[0], r[1])).epsilon(1e-12));
  CHECK(N_VMaxNorm(f[0]) == N_VMaxNorm(r[0]));
  CHECK(N_VWrmsNorm(f[0], f[1]) == Approx(N_VWrmsNorm(r[0], r[1])).epsilon(1e-12));
  CHECK(N_VWrmsNormMask(f[0], f[1], f[3]) == Approx(N_VWrmsNormMask(r[0], r[1], r[3])).epsilon(1e-12));
  CHECK(N_VMin(f[0]) == N_VMin(r[0]));
  CHECK(N_VWL2Norm(f[0], f[1]) == Approx(N_VWL2Norm(r[0], r[1])).epsilon(1e-12));
  CHECK(N_VL1Norm(f[0]) == Approx(N_VL1Norm(r[0])).epsilon(1e-12));
  CHECK(N_VWSqrSumLocal(f[0], f[1]) == Approx(N_VWSqrSumLocal(r[0], r[1])).epsilon(1e-12));
  CHECK(N_VInvTest(f[0], f[5]) == N_VInvTest(r[0], r[5]));
  v.same(5);
  N_VConst(0.0, r[4]);
  N_VConst(0.0, f[4]);
  CHECK(N_VInvTest(f[4], f[5]) == N_VInvTest(r[4], r[5]));

  // Fused operations: the library's fallbacks (fused ops off on r) against ours.
  hawser::sundials::real c[3] = {0.5, -1.25, 2.0};
  N_VLinearCombination(3, c, r.data(), r[5]);
  N_VLinearCombination(3, c, f.data(), f[5]);
  v.same(5);
  // In place on the first vector, as CVODE does.
  N_Vector rx[2] = {r[5], r[1]}, fx[2] = {f[5], f[1]};
  N_VLinearCombination(2, c, rx, r[5]);
  N_VLinearCombination(2, c, fx, f[5]);
  v.same(5);
  // Nine vectors (passes of four, four and one), in place on the first: ARKODE's stage sums.
  hawser::sundials::real c9[9] = {0.5, -1.25, 2.0, 0.75, -0.3, 1.1, -2.2, 0.05, 3.0};
  N_Vector r9[9] = {r[5], r[0], r[1], r[2], r[3], r[4], r[0], r[1], r[2]};
  N_Vector f9[9] = {f[5], f[0], f[1], f[2], f[3], f[4], f[0], f[1], f[2]};
  for (int nv : {4, 5, 9}) {
    N_VLinearCombination(nv, c9, r9, r[5]);
    N_VLinearCombination(nv, c9, f9, f[5]);
    v.same(5);
  }
  N_Vector ry[2] = {r[1], r[2]}, fy[2] = {f[1], f[2]}, rz[2] = {r[4], r[5]}, fz[2] = {f[4], f[5]};
  N_VScaleAddMulti(2, c, r[0], ry, rz);
  N_VScaleAddMulti(2, c, f[0], fy, fz);
  v.same(4);
  v.same(5);
  hawser::sundials::real dr[2], df[2];
  N_VDotProdMulti(2, r[0], ry, dr);
  N_VDotProdMulti(2, f[0], fy, df);
  CHECK(df[0] == Approx(dr[0]).epsilon(1e-12));
  CHECK(df[1] == Approx(dr[1]).epsilon(1e-12));
  // Clones inherit the compiled operations.
  N_Vector clone = N_VClone(f[0]);
  CHECK(clone->ops->nvlinearsum == f[0]->ops->nvlinearsum);
  CHECK(clone->ops->nvlinearsum != r[0]->ops->nvlinearsum);
  N_VDestroy(clone);
}

TEST_CASE("one-pass error weights equal the library's abs, linear sum, min and inverse",
          "[integrator][vector]") {
  // Reference: what cvEwtSetSV does with the library's own operations (SUNDIALS 6.4
  // cvode.c): tempv = |y|; tempv = rtol tempv + atol; fail if min(tempv) <= 0; w = 1 / tempv.
  Vectors v(6, 1001);
  auto& r = v.ref;
  auto& f = v.fast;
  const double rtol = 1e-6;
  N_VAbs(r[1], r[4]);
  N_VAbs(r[1], f[4]);  // the atol vector: positive, in both
  N_VAbs(r[0], r[5]);
  N_VLinearSum(rtol, r[5], 1.0, r[4], r[5]);
  REQUIRE(N_VMin(r[5]) > 0.0);
  N_VInv(r[5], r[5]);
  REQUIRE(hawser::sundials::error_weights(f[0], rtol, NV_DATA_S(f[4]), false, f[5]));
  v.same(5);
  // One atol for all components.
  N_VAbs(r[0], r[5]);
  N_VScale(rtol, r[5], r[5]);
  N_VAddConst(r[5], 1e-3, r[5]);
  N_VInv(r[5], r[5]);
  const double one_atol = 1e-3;
  REQUIRE(hawser::sundials::error_weights(f[0], rtol, &one_atol, true, f[5]));
  v.same(5);
  // A zero weight denominator is reported, as cvEwtSetSV does (y_i = 0 with atol_i = 0).
  NV_Ith_S(f[0], 17) = 0.0;
  NV_Ith_S(f[4], 17) = 0.0;
  CHECK_FALSE(hawser::sundials::error_weights(f[0], rtol, NV_DATA_S(f[4]), false, f[5]));
}

TEST_CASE("the finiteness probe finds one NaN or infinity anywhere", "[integrator][vector]") {
  Vectors v(6, 1001);
  N_Vector x = v.fast[0];
  CHECK(hawser::sundials::all_finite(x));
  for (sunindextype at : {sunindextype(0), sunindextype(500), sunindextype(1000)}) {
    const double keep = NV_Ith_S(x, at);
    NV_Ith_S(x, at) = std::numeric_limits<double>::quiet_NaN();
    CHECK_FALSE(hawser::sundials::all_finite(x));
    NV_Ith_S(x, at) = -std::numeric_limits<double>::infinity();
    CHECK_FALSE(hawser::sundials::all_finite(x));
    NV_Ith_S(x, at) = keep;
  }
  CHECK(hawser::sundials::all_finite(x));
}
