#include "solver/commands.hpp"

#include <iostream>

#include "solver/design_report.hpp"
#include "solver/key_reference.hpp"
#include "solver/scenario.hpp"

namespace hawser {

int cmd_check(const CommonOptions& opt) {
  const Scenario sc = load_scenario(opt.scenario, opt.overrides);
  std::cout << opt.scenario << ": ok (" << sc.name << ", " << sc.mesh.elements << " elements)\n";
  return 0;
}

int cmd_design(const CommonOptions& opt, bool json) {
  const Scenario sc = load_scenario(opt.scenario, opt.overrides);
  if (sc.field.uniform) {
    std::cerr << "error: " << opt.scenario << ": field.kind: the static design is for a tether on a planet; this "
              << "scenario is a uniform-field test bench\n";
    return 2;
  }
  const TetherDesign design(EquatorialField(sc.planet, sc.j2), sc.material, sc.tether, sc.counterweight);
  const DesignFigures fig = evaluate_design(design, json ? 400 : 200);
  if (json)
    std::cout << design_json(sc, design, fig).dump(1) << '\n';
  else
    std::cout << design_table(sc, design, fig);
  return 0;
}

int cmd_keys() {
  std::cout << KeyReference::builtin().describe();
  return 0;
}

}  // namespace hawser
