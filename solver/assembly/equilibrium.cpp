#include "solver/assembly/equilibrium.hpp"

#include <sstream>

#include "solver/input/errors.hpp"

namespace hawser {

Equilibrium solve_equilibrium(const Mesh& mesh, double e_pa, double pretension_n,
                              const std::vector<const ForceModel*>& body) {
  const std::size_t n = mesh.elements();
  const Matrix3X zero_v = Matrix3X::Zero(3, mesh.nodes());
  const TetherState at_rest{0.0, mesh.position, zero_v, mesh.node_mass};
  Matrix3X f = Matrix3X::Zero(3, mesh.nodes());
  for (const ForceModel* m : body) m->add_forces(at_rest, f);

  Equilibrium eq;
  eq.tension_n.assign(n, 0.0);
  eq.l0_m.assign(n, 0.0);
  eq.s0_m.assign(n + 1, 0.0);
  const Eigen::Vector3d a = mesh.axis;
  eq.tension_n[n - 1] = mesh.far_end_fixed ? pretension_n : f.col(n).dot(a);
  for (std::size_t e = n - 1; e > 0; --e) eq.tension_n[e - 1] = eq.tension_n[e] + f.col(e).dot(a);
  for (std::size_t e = 0; e < n; ++e) {
    if (eq.tension_n[e] <= 0.0) {
      std::ostringstream os;
      os << "no equilibrium in tension: element " << e << " would carry " << eq.tension_n[e]
         << " N (a cable cannot push; check the counterweight, gravity direction or pretension)";
      throw InputError(os.str());
    }
    const double l = (mesh.position.col(e + 1) - mesh.position.col(e)).norm();
    eq.l0_m[e] = l / (1.0 + eq.tension_n[e] / (e_pa * mesh.element_area[e]));
    eq.s0_m[e + 1] = eq.s0_m[e] + eq.l0_m[e];
  }
  eq.as_built_tension_n = eq.tension_n;
  return eq;
}

}  // namespace hawser
