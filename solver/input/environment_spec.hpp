#pragma once
// The environment and events of a scenario (keys environment.* and events.*), validated, in SI.
// Read by read_environment() (solver/input/environment_reader.cpp); turned into force models,
// cuts and strikes by build_environment() (solver/assembly/environment_builder.hpp). Every item
// keeps where it was written, for messages about it.
#include <Eigen/Core>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "models/wind_profile.hpp"

namespace hawser {

enum class AtmosphereKind { none, us1976, uniform };

/// One mean-wind profile (a models/wind_profile.hpp object, kept as such).
struct WindSpec {
  WindProfile profile;
  std::string where;
};

struct GustItemSpec {
  double amplitude_m_s = 0.0;        // U_ds [m/s]
  double gradient_time_s = 0.0;      // t_H [s] (given, or gradient distance / front speed)
  Eigen::Vector3d direction_enu{1.0, 0.0, 0.0};  // toward which it blows (east, north, up)
  double altitude_low_m = 0.0, altitude_high_m = 0.0, edge_width_m = 0.0;  // [m]
  double onset_s = 0.0;              // [s]
  std::string where;
};

struct TurbulenceStationSpec {
  double altitude_m = 0.0;           // [m]
  double mean_speed_m_s = 0.0;       // V carrying the frozen turbulence [m/s]
  Eigen::Vector3d sigma_m_s = Eigen::Vector3d::Zero();  // (u, v, w) intensities [m/s]
  Eigen::Vector3d scale_m = Eigen::Vector3d::Ones();    // (L_u, L_v, L_w) [m]
};

struct TurbulenceSpec {
  bool given = false;
  std::uint64_t seed = 1;
  double from_direction_deg = 0.0;   // the along-wind (u) axis: the wind blows from here [deg]
  double sample_interval_s = 0.0;    // as given, or resolved by the reader: a fifth of the
                                     // smallest L/V of the stations
  double series_length_s = 0.0;      // the run and a margin past its end (set by the reader)
  std::vector<TurbulenceStationSpec> stations;
  std::string where;
};

/// One third body's epoch geometry: planet-fixed east longitude of its ascending node and
/// argument of latitude at t = 0; inclination to the equator (absent: the data's default).
struct TideBodySpec {
  bool on = false;
  double node_longitude_rad = 0.0;
  double phase_rad = 0.0;
  std::optional<double> inclination_rad;
};

struct TidesSpec {
  TideBodySpec moon, sun;
  bool in_static_state = false;  // load the starting static state with the tides at t = 0
  std::string where;
};

struct CutSpec {
  std::optional<std::size_t> element;  // element index, or
  std::optional<double> altitude_m;    // altitude [m] (planet: |x| - R; bench: distance from node 0)
  double time_s = 0.0;
  std::string where;
};

struct StrikeSpec {
  std::optional<std::size_t> node;     // node index, or
  std::optional<double> altitude_m;    // altitude [m]: the nearest free node
  double time_s = 0.0;
  std::optional<Eigen::Vector3d> delta_v_m_s;  // rotating frame (x up, y east, z north), or
  std::optional<Eigen::Vector3d> impulse_n_s;  // divided by the node's mass
  std::string where;
};

struct EnvironmentSpec {
  AtmosphereKind atmosphere = AtmosphereKind::none;
  double air_density_kg_m3 = 0.0;      // uniform atmosphere only
  double drag_coefficient = 0.0;       // Cd [-] (given, or the section's default)
  std::string where;                   // of the environment block
  std::vector<WindSpec> winds;
  std::vector<GustItemSpec> gusts;
  TurbulenceSpec turbulence;
  TidesSpec tides;
  std::vector<CutSpec> cuts;
  std::vector<StrikeSpec> strikes;
  bool any_air() const { return atmosphere != AtmosphereKind::none; }
};

}  // namespace hawser
