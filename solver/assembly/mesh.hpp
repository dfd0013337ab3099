#pragma once
// The tether divided into N bar elements and N + 1 nodes, in its stretched reference
// geometry (the static design's straight radial line, or the test bench's straight cable).
//
// Lumped masses (physics.md section 3): each element's mass, rho times the integral of the
// design area over the element, goes half to each end node; the counterweight adds to the
// top node. The element's area for stiffness is the mean design area over the element, so
// element mass = rho A_e l_e with l_e the element's stretched length (the design measures
// mass along the stretched tether).
#include <Eigen/Core>
#include <vector>

#include "models/force_model.hpp"

namespace hawser {

class TetherDesign;
struct MeshSpec;
struct FieldSpec;
struct Material;

struct Mesh {
  Matrix3X position;                  // (3, N+1) the static state runs and modes start from [m]
  Matrix3X as_built_position;         // (3, N+1) the unloaded design geometry (straight) [m]
  Eigen::VectorXd node_mass;          // (N+1) [kg], counterweight included at node N
  std::vector<double> element_area;   // (N) [m^2]
  std::vector<double> element_mass;   // (N) [kg]
  double counterweight_mass = 0.0;    // [kg] hung at node N (the scenario's, given or computed)
  double as_built_counterweight_kg = 0.0;  // [kg] the design's, which the L0 were built for
  Eigen::Vector3d axis = Eigen::Vector3d::UnitX();  // direction from node 0 to node N
  bool far_end_fixed = false;         // node N held (test bench only)
  std::size_t elements() const { return element_area.size(); }
  std::size_t nodes() const { return element_area.size() + 1; }
};

/// Element boundaries along [0, length] [m]: N equal elements, or geometric growth from
/// `first_m` (the ratio found so that the lengths add up to `length`).
std::vector<double> graded_stations(double length_m, int elements, bool geometric, double first_m);

/// Mesh of a planet tether from its design: nodes from the anchor radius to the top along +x.
Mesh build_planet_mesh(const TetherDesign& design, const MeshSpec& spec);
/// Mesh of the test bench: a straight uniform cable along +x from the origin.
Mesh build_bench_mesh(const Material& material, const FieldSpec& field, const MeshSpec& spec);

/// Distance of each node from node 0 along the as-built (unloaded, stretched) geometry [m].
std::vector<double> reference_distance(const Mesh& mesh);

}  // namespace hawser
