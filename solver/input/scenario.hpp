#pragma once
// A validated scenario: typed structs in SI units, the input of every command. It is the end
// of the validation stage (solver/input/scenario_builder.cpp): a Scenario that exists has no
// input error left to find, and no raw key travels beyond it.
#include <array>
#include <string>
#include <vector>

#include "models/material.hpp"
#include "models/planet.hpp"
#include "models/taper_design.hpp"
#include "solver/input/climber_spec.hpp"
#include "solver/input/environment_spec.hpp"
#include "solver/input/integration_method.hpp"

namespace hawser {

struct AnchorSpec {
  double latitude_rad = 0.0;
  double longitude_rad = 0.0;
};

struct MeshSpec {
  int elements = 0;
  bool geometric = false;               // geometric grading from the anchor
  double first_element_length_m = 0.0;  // geometric only
  bool climber_load_smooth = true;      // climbers' load: smooth window, else on two nodes
  double climber_load_width = 1.0;      // smooth window's half width [shortest elements]
};

/// The laboratory test bench (field.kind = uniform) or the planet's rotating frame.
struct FieldSpec {
  bool uniform = false;
  double gravity_m_s2 = 0.0;   // uniform: along the cable, away from node 0
  double cable_length_m = 0.0;
  double cable_area_m2 = 0.0;
  bool far_end_fixed = false;
  double pretension_n = 0.0;
};

struct SimulationSpec {
  bool given = false;           // the scenario has a simulation block
  double duration_s = 0.0;
  double output_interval_s = 0.0;
  Method method = Method::bdf;
  double rtol = 0.0;
  double atol_position_m = 0.0;
  double atol_velocity_m_s = 0.0;
  double max_step_s = 0.0;      // 0: none
  int max_order = 0;            // 0: the method's recommended order
  long max_steps_per_output = 1000000;
  bool stop_on_rupture = true;
};

/// A half-sine displacement over [from, to] of the distance from node 0 along the reference.
struct DisplacementSpec {
  enum class Direction { east, north, along };
  Direction direction = Direction::east;
  double amplitude_m = 0.0;
  double from_m = 0.0;
  double to_m = -1.0;           // < 0: the far end
};

struct KickSpec {
  int node = 0;
  std::array<double, 3> velocity_m_s{};  // rotating frame (x up, y east, z north)
};

struct InitialSpec {
  std::vector<DisplacementSpec> displacements;
  std::vector<KickSpec> kicks;
  int mode_index = 0;           // 1 = lowest mode; 0 = none
  std::string mode_where;       // where initial.mode.index was written
  double mode_amplitude_m = 0.0;
};

struct OutputSpec {
  int node_stride = 1;
  std::vector<int> nodes;       // explicit choice; empty: use the stride
  double flush_interval_s = 10.0;  // wall-clock time between publications of the result file
  int flush_every = 0;             // also every this many outputs (0: off)
  int deflate_level = 0;           // 0: no compression; else shuffle + deflate at this level
};

/// A static load case of `hawser design` (load_cases[] in config/scenario_keys.yaml).
struct LoadCaseSpec {
  struct Parked {
    double mass_kg = 0.0;
    double altitude_m = 0.0;  // along the as-built tether at rest, from the anchor
  };
  std::string name;
  std::vector<Parked> climbers;
  double counterweight_change = 0.0;  // relative to the design's computed mass [-]
  bool mean_wind = false;
  bool tides = false;                 // the tides at t = 0
};

struct Scenario {
  std::string name;
  std::string file;          // as given on the command line
  std::string text_as_run;   // YAML after --set, named entries written out
  Planet planet;
  bool j2 = false;
  Material material;
  TetherSpec tether;
  CounterweightSpec counterweight;
  AnchorSpec anchor;
  MeshSpec mesh;
  FieldSpec field;
  SimulationSpec simulation;
  InitialSpec initial;
  OutputSpec output;
  EnvironmentSpec environment;  // air, wind, tides, cuts, strikes (environment_reader.hpp)
  std::vector<ClimberSpec> climbers;     // climbers[] and every departure of schedules[]
  ClimberSpeedReference climber_speeds = ClimberSpeedReference::stretched_ribbon;
  std::vector<LoadCaseSpec> load_cases;  // the load-case table of `hawser design`
  int built_under = -1;                  // load case the tether is built under; -1: unloaded
  double min_base_margin = 0.0;          // warn below this base-tension margin [-]
  std::string where;         // the file's location, for messages about the whole scenario
};

/// Reads, validates and checks a scenario; throws InputError listing every problem found
/// (each with file:line:column and key path).
Scenario load_scenario(const std::string& file, const std::vector<std::string>& overrides);
/// Same from text (tests); `file` names it in messages.
Scenario load_scenario_text(const std::string& text, const std::string& file,
                            const std::vector<std::string>& overrides);

}  // namespace hawser
