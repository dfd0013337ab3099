#pragma once
// The integration methods a scenario may choose (simulation.method; the README's section on
// choosing one). bdf and adams are CVODE's; esdirk and erk are ARKODE's ARKStep.
#include <string>

namespace hawser {

enum class Method {
  bdf,     // CVODE BDF, Newton iteration with the analytic Jacobian
  adams,   // CVODE Adams-Moulton, fixed-point iteration
  erk,     // ARKStep explicit Runge-Kutta
  esdirk,  // ARKStep L-stable implicit Runge-Kutta (ESDIRK, order 3), Newton iteration
};

/// "bdf" | "adams" | "erk" | "esdirk"; anything else throws InputError listing the names.
Method parse_method(const std::string& name);
std::string method_name(Method method);

}  // namespace hawser
