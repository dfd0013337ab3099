#include "solver/assembly/climber_builder.hpp"

#include <algorithm>

#include "solver/input/climber_reader.hpp"
#include "solver/input/errors.hpp"
#include "solver/input/scenario_reader.hpp"

namespace hawser {
namespace {

/// Altitude (distance along the reference) -> material coordinate, linear on each element.
class CoordinateMap {
 public:
  CoordinateMap(const std::vector<double>& ref, const std::vector<double>& coord)
      : ref_(ref), coord_(coord) {}
  double operator()(double h) const {
    auto it = std::upper_bound(ref_.begin(), ref_.end(), h);
    std::size_t e = static_cast<std::size_t>(std::max<long>(0, (it - ref_.begin()) - 1));
    e = std::min(e, ref_.size() - 2);
    const double xi = (h - ref_[e]) / (ref_[e + 1] - ref_[e]);
    return coord_[e] + xi * (coord_[e + 1] - coord_[e]);
  }

 private:
  const std::vector<double>& ref_;
  const std::vector<double>& coord_;
};

}  // namespace

std::vector<Climber> build_climbers(const std::vector<ClimberSpec>& specs,
                                    const std::vector<double>& reference,
                                    const std::vector<double>& coordinate) {
  const CoordinateMap map(reference, coordinate);
  std::vector<Climber> out;
  for (const ClimberSpec& s : specs) {
    Climber c;
    c.name = s.name;
    c.mass_kg = s.mass_kg;
    c.sudden = s.sudden;
    c.at_end = s.at_end;
    c.end_mass_kg = s.end_mass_kg;
    c.drag_area_m2 = s.drag_area_m2;
    try {
      c.profile = climb_profile(s, map);
    } catch (const ProfileError& e) {
      throw InputError(format_problems({{s.where, s.key, std::string(e.what()) +
                                                             " (on the tether as built)"}}));
    }
    out.push_back(std::move(c));
  }
  return out;
}

}  // namespace hawser
