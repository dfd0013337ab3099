#pragma once
// The loads of one static state of the as-built tether (physics.md section 3), gathered for
// solver/assembly/static_solver.hpp: climbers parked at material coordinates, the counterweight hung at
// the top, the mean wind's drag, the tides at t = 0. Used for the scenario's own starting state
// (build_model) and for the load cases of `hawser design` (solver/assembly/load_case_table.hpp).
#include <string>
#include <vector>

#include "models/climber_load.hpp"
#include "solver/assembly/static_solver.hpp"

namespace hawser {

struct TetherModel;

struct StaticLoads {
  std::vector<Climber> parked;  // sitting at profile.from(), a material coordinate s [m]
  std::vector<double> climber_path;  // or along this coordinate (ClimberLoad::set_path), if given
  double counterweight_kg = 0;  // hung at the top node [kg] (planet tether; ignored on the bench)
  bool mean_wind = false;       // the model's mean_drag (must exist)
  bool tides = false;           // the model's tidal force at t = 0 (must exist)
  LoadSpread spread = LoadSpread::point;  // how the climbers' loads reach the nodes (as in the run)
  double spread_width = 1.0;              // smooth: the window's half width [shortest elements]
};

struct LoadedState {
  StaticState state;
  std::string description;  // the loads, for messages and the result file
  bool loaded = false;      // false: nothing to hang; state is the as-built one
};

/// Material coordinate s [m] of altitude h [m] along the as-built tether, from the nodes'
/// altitudes (reference_m) and material coordinates (s0_m), linear on each element.
double material_coordinate(const std::vector<double>& reference_m, const std::vector<double>& s0_m,
                           double h_m);

/// A climber of `mass_kg` parked for ever at material coordinate `s_m`.
Climber parked_climber(const std::string& name, double mass_kg, double s_m);

/// The static state of the as-built `model` under `loads`, L0 fixed. Throws InputError when
/// there is none (solve_static).
LoadedState solve_static_loads(const TetherModel& model, const StaticLoads& loads);

}  // namespace hawser
