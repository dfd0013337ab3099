#pragma once
// Owning wrappers for SUNDIALS handles and the one checked-call path into SUNDIALS.
// Only solver/integration/time_integrator.cpp includes this header: no other file sees a SUNDIALS type.
// What differs between SUNDIALS 6 and 7 is in sundials_compat.hpp.
//
// Every SUNDIALS object is created inside a SUNContext and must be freed before it, so an
// owner of the context is declared before (and therefore destroyed after) everything else.
#include <cstdlib>
#include <memory>
#include <string>
#include <type_traits>

#include <arkode/arkode_arkstep.h>
#include <cvode/cvode.h>
#include <cvode/cvode_ls.h>
#include <nvector/nvector_serial.h>

#include <sundials/sundials_context.h>
#include <sundials/sundials_linearsolver.h>
#include <sundials/sundials_matrix.h>
#include <sundials/sundials_nonlinearsolver.h>

#include "solver/input/errors.hpp"
#include "solver/integration/sundials_compat.hpp"
#include "solver/integration/sundials_fast_vector.hpp"

namespace hawser::sundials {

// ---- checked calls -------------------------------------------------------------------

/// A module's table of return-flag names (CVodeGetReturnFlagName and friends). The string
/// it returns is malloc'ed by SUNDIALS and freed here.
using FlagNamer = char* (*)(long int);

inline std::string flag_name(FlagNamer namer, long int flag) {
  char* raw = namer(flag);
  std::string name = raw ? raw : "unknown flag";
  std::free(raw);
  return name;
}

/// Throws LibraryError("CVodeInit failed: flag -22 (CV_ILL_INPUT)") when flag < 0.
inline void check(int flag, const char* call, FlagNamer namer) {
  if (flag < 0)
    throw LibraryError(std::string(call) + " failed: flag " + std::to_string(flag) + " (" +
                       flag_name(namer, flag) + ")");
}
inline void check_cvode(int flag, const char* call) { check(flag, call, CVodeGetReturnFlagName); }
inline void check_cvls(int flag, const char* call) { check(flag, call, CVodeGetLinReturnFlagName); }
inline void check_arkode(int flag, const char* call) {
  check(flag, call, HAWSER_ARKODE(GetReturnFlagName));
}

/// Calls the ARKODE function `name` that all its steppers share (HAWSER_ARKODE in
/// sundials_compat.hpp) with the arguments that follow, and checks its flag.
#define HAWSER_ARKODE_CHECKED(name, ...) \
  ::hawser::sundials::check_arkode(HAWSER_ARKODE(name)(__VA_ARGS__), HAWSER_ARKODE_NAME(name))

/// Calls outside the integrators (SUNContext_Create, SUNMatZero) return 0 on success and
/// have no table of names.
inline void check_status(int flag, const char* call) {
  if (flag != kSuccess)
    throw LibraryError(std::string(call) + " failed: flag " + std::to_string(flag));
}

/// Constructors report failure by returning NULL.
template <class Handle>
Handle check_created(Handle handle, const char* call) {
  if (handle == nullptr) throw LibraryError(std::string(call) + " failed: returned NULL");
  return handle;
}

// ---- owners --------------------------------------------------------------------------

struct ContextFree {
  void operator()(SUNContext c) const noexcept { SUNContext_Free(&c); }
};
struct VectorFree {
  void operator()(N_Vector v) const noexcept { N_VDestroy(v); }
};
struct MatrixFree {
  void operator()(SUNMatrix m) const noexcept { SUNMatDestroy(m); }
};
struct LinearSolverFree {
  void operator()(SUNLinearSolver s) const noexcept { SUNLinSolFree(s); }
};
struct NonlinearSolverFree {
  void operator()(SUNNonlinearSolver s) const noexcept { SUNNonlinSolFree(s); }
};
struct CvodeFree {
  void operator()(void* mem) const noexcept { CVodeFree(&mem); }
};
struct ArkodeFree {
  void operator()(void* mem) const noexcept { HAWSER_ARKODE(Free)(&mem); }
};

using Context = std::unique_ptr<std::remove_pointer_t<SUNContext>, ContextFree>;
using Vector = std::unique_ptr<std::remove_pointer_t<N_Vector>, VectorFree>;
using Matrix = std::unique_ptr<std::remove_pointer_t<SUNMatrix>, MatrixFree>;
using LinearSolver = std::unique_ptr<std::remove_pointer_t<SUNLinearSolver>, LinearSolverFree>;
using NonlinearSolver =
    std::unique_ptr<std::remove_pointer_t<SUNNonlinearSolver>, NonlinearSolverFree>;
using CvodeMemory = std::unique_ptr<void, CvodeFree>;
using ArkodeMemory = std::unique_ptr<void, ArkodeFree>;

inline Context make_context() {
  SUNContext raw = nullptr;
  check_status(create_context(&raw), "SUNContext_Create");
  return Context(raw);
}

/// A serial vector that owns no data: it is pointed at caller arrays (copy-free I/O).
/// Serial vectors carry the compiled arithmetic of sundials_fast_vector.hpp where it is
/// faster than the library's (kCompiledVectorOps); every clone the solvers make inherits it.
inline Vector make_view_vector(long n, SUNContext ctx) {
  Vector v(check_created(N_VNewEmpty_Serial(n, ctx), "N_VNewEmpty_Serial"));
  if (kCompiledVectorOps) install_fast_serial_ops(v.get());
  return v;
}

inline Vector make_vector(long n, SUNContext ctx) {
  Vector v(check_created(N_VNew_Serial(n, ctx), "N_VNew_Serial"));
  if (kCompiledVectorOps) install_fast_serial_ops(v.get());
  return v;
}

}  // namespace hawser::sundials
