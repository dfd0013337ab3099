#include "solver/input/integration_method.hpp"

#include "solver/input/errors.hpp"

namespace hawser {

namespace {
constexpr struct {
  Method method;
  const char* name;
} kMethods[] = {{Method::bdf, "bdf"},
                {Method::adams, "adams"},
                {Method::erk, "erk"},
                {Method::esdirk, "esdirk"}};
}  // namespace

Method parse_method(const std::string& name) {
  for (const auto& m : kMethods)
    if (name == m.name) return m.method;
  throw InputError("unknown integration method '" + name + "' (valid: bdf, adams, erk, esdirk)");
}

std::string method_name(Method method) {
  for (const auto& m : kMethods)
    if (m.method == method) return m.name;
  return "unknown";
}

}  // namespace hawser
