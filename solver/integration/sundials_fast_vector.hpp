#pragma once
// Compiled replacements for the arithmetic of SUNDIALS' serial N_Vector.
//
// Why: Debian's SUNDIALS libraries (6.4.1 on Debian 12, 7.1.1 on 13) are built without
// optimisation (their machine code keeps every local on the stack), so N_VLinearSum and
// friends cost about 20 instructions per element; at 6,000 state components they dominated
// the run time (callgrind on 6.4: 70% of all instructions in a 100-element run; the figures
// on both releases are in sundials_compat.hpp). SUNDIALS lets a vector carry
// its own operations table; install_fast_serial_ops() replaces the arithmetic entries of
// a serial vector's table with the same operations compiled here with the project's flags.
// Clones copy the table, so every vector the integrator makes from this one inherits it.
// Semantics follow nvector_serial.c of SUNDIALS 6.4 (BSD-3-Clause) operation by operation;
// tests/unit/test_fast_vector.cpp checks each against the library's own implementation, on
// whichever SUNDIALS it is built with (7.1 included).
#include <sundials/sundials_nvector.h>

namespace hawser::sundials {

/// Replaces the arithmetic operations of a serial N_Vector (created by N_VNew_Serial,
/// N_VNewEmpty_Serial or N_VMake_Serial) with compiled ones, and enables the fused ones.
void install_fast_serial_ops(N_Vector v);

/// True if every entry of a serial N_Vector is finite (no NaN, no infinity).
bool all_finite(N_Vector v);

/// The integrators' error weights w_i = 1 / (rtol |y_i| + atol_i) in one pass (atol: one
/// value if one_atol, else one per component). False if some rtol |y_i| + atol_i <= 0, as
/// the library's own weight functions (cvEwtSetSV) report it.
bool error_weights(N_Vector y, double rtol, const double* atol, bool one_atol, N_Vector w);

}  // namespace hawser::sundials
