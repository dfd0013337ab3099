#include "solver/integration/summary_keeper.hpp"

#include <algorithm>
#include <cmath>

namespace hawser {

void SummaryKeeper::observe(double t, const Matrix3X& x, const TetherDiagnostics& d) {
  for (std::size_t e = 0; e < d.tension_n.size(); ++e) {
    if (d.tension_n[e] > s_.peak_tension_n) {
      s_.peak_tension_n = d.tension_n[e];
      s_.peak_tension_element = e;
      s_.peak_tension_time_s = t;
    }
    if (d.tension_n[e] < s_.min_tension_n) {
      s_.min_tension_n = d.tension_n[e];
      s_.min_tension_element = e;
      s_.min_tension_time_s = t;
    }
  }
  if (d.max_stress_ratio > 0.0 && 1.0 / d.max_stress_ratio < s_.min_safety_factor) {
    s_.min_safety_factor = 1.0 / d.max_stress_ratio;
    s_.min_safety_factor_element = d.max_stress_element;
    s_.min_safety_factor_time_s = t;
  }
  for (std::size_t k = 0; k < model_.nodes(); ++k) {
    const Eigen::Vector3d u = x.col(k) - model_.mesh.position.col(k);
    if (std::abs(u.y()) > s_.peak_east_west_m) {
      s_.peak_east_west_m = std::abs(u.y());
      s_.peak_east_west_node = k;
      s_.peak_east_west_time_s = t;
    }
    if (std::abs(u.z()) > s_.peak_north_south_m) {
      s_.peak_north_south_m = std::abs(u.z());
      s_.peak_north_south_node = k;
      s_.peak_north_south_time_s = t;
    }
  }
  if (d.slack_elements > 0 && s_.first_slack_time_s < 0.0) s_.first_slack_time_s = t;
  s_.max_slack_elements = std::max(s_.max_slack_elements, d.slack_elements);
}

}  // namespace hawser
