#include "solver/integration/energy_budget.hpp"

#include <algorithm>
#include <cmath>

namespace hawser {

double energy_residual(const EnergyBalance& b, const TetherDiagnostics& d) {
  double work = 0.0;
  for (double w : d.work_j) work += w;
  const double change = (d.kinetic_j - b.start_kinetic_j) + (d.potential_j - b.start_potential_j) +
                        (d.strain_j - b.start_strain_j) + (d.climber_j - b.start_climbers_j);
  return change - work + d.dissipated_j;
}

void EnergyBalance::observe(double t_s, const TetherDiagnostics& d) {
  if (!started) {
    started = true;
    start_kinetic_j = d.kinetic_j;
    start_potential_j = d.potential_j;
    start_strain_j = d.strain_j;
    start_climbers_j = d.climber_j;
  }
  const double r = energy_residual(*this, d);
  if (std::abs(r) > std::abs(residual_j)) {
    residual_j = r;
    residual_time_s = t_s;
  }
  double x = std::abs(d.kinetic_j - start_kinetic_j) + std::abs(d.potential_j - start_potential_j) +
             std::abs(d.strain_j - start_strain_j) + std::abs(d.climber_j - start_climbers_j) +
             std::abs(d.dissipated_j);
  for (double w : d.work_j) x += std::abs(w);
  exchanged_j = std::max(exchanged_j, 0.5 * x);
}

}  // namespace hawser
