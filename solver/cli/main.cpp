// hawser: dynamics of very long tethers in a planet's rotating frame.
// The command line: parses arguments, calls one command, maps errors to exit codes.
#include <CLI/CLI.hpp>

#include <hdf5.h>

#include <iostream>

#include "solver/cli/cmd_modes.hpp"
#include "solver/cli/cmd_sweep.hpp"
#include "solver/cli/commands.hpp"
#include "solver/input/errors.hpp"

int main(int argc, char** argv) {
  // Every HDF5 file is closed explicitly. The library's own clean-up at exit would try again
  // to flush a file whose close failed (a full disk) and crash; without it the process exits
  // with its own code.
  H5dont_atexit();
  using namespace hawser;
  CLI::App app{"hawser " HAWSER_VERSION ": dynamics of very long tethers (research tool, not a certification method)"};
  app.require_subcommand(1);
  app.set_version_flag("--version", std::string(HAWSER_VERSION));

  CommonOptions opt;
  bool json = false;
  auto add_common = [&](CLI::App* sub) {
    sub->add_option("SCENARIO", opt.scenario, "scenario file (YAML)")->required();
    sub->add_option("--set", opt.overrides, "override a scenario key: key.path=value, list items by index as climbers[0].mass=30t (repeatable)")
        ->type_name("KEY=VALUE");
  };
  CLI::App* check = app.add_subcommand("check", "validate a scenario; list every problem with file:line:column and key");
  add_common(check);
  CLI::App* design = app.add_subcommand("design", "static design: taper, areas, masses, tensions, stresses, wave speeds");
  add_common(design);
  design->add_flag("--json", json, "print JSON (stable keys, units in the key names)");
  CLI::App* keys = app.add_subcommand("keys", "print the reference of every scenario key with its unit and meaning");
  std::string keys_prefix;
  keys->add_option("PREFIX", keys_prefix,
                   "only the keys whose path starts with this (climbers, simulation.rtol)");
  bool overwrite = false;
  CLI::App* run = app.add_subcommand("run", "time-domain simulation, written to an HDF5 result file");
  add_common(run);
  std::string output;
  run->add_option("-o,--output", output, "result file (default: <scenario name>.h5 in the current directory)");
  run->add_flag("--overwrite", overwrite,
                "replace the result file if it exists (refused otherwise)");
  std::string resume;
  run->add_option("--resume", resume,
                  "continue the run a killed `hawser run` left in this result file (same scenario and --set values)")
      ->type_name("RESULT.h5");
  CLI::App* modes = app.add_subcommand("modes", "periods, damping, kinds and shapes of the lowest modes about the equilibrium");
  add_common(modes);
  int modes_k = 10;
  modes->add_option("-k", modes_k, "number of modes, lowest first")->capture_default_str();
  modes->add_option("-o,--output", output, "write the mode shapes to this HDF5 file");
  modes->add_flag("--overwrite", overwrite, "replace that file if it exists (refused otherwise)");
  modes->add_flag("--json", json, "print JSON (stable keys, units in the key names)");

  // Sweeps: many variants of one scenario (solver/cli/cmd_sweep.hpp).
  SweepOptions sw;
  CLI::App* sweep = app.add_subcommand(
      "sweep", "run the variants of a study (YAML) on the local cores or as a Slurm job array; "
               "summary.csv and a ranking");
  sweep->add_option("STUDY", sw.study, "study file (YAML; see config/study_keys.yaml)")->required();
  sweep->add_option("-j,--jobs", sw.jobs, "runs at once on this machine (default: every core)")
      ->check(CLI::PositiveNumber);
  sweep->add_option("-o,--output", sw.output, "sweep folder (default: <study name>-sweep)");
  sweep->add_option("--variant", sw.variant, "run only this variant, by index (a Slurm array task)")
      ->check(CLI::NonNegativeNumber);
  sweep->add_flag("--collect", sw.collect,
                  "build summary.csv and ranking.md from the folder's finished files");
  sweep->add_flag("--slurm", sw.slurm,
                  "write the sbatch script of a job array (one task per variant) and submit it");
  sweep->add_flag("--dry-run", sw.dry_run,
                  "with --slurm: print the script instead of submitting it");
  sweep->add_option("--partition", sw.slurm_options.partition, "with --slurm: the Slurm partition");
  sweep->add_option("--time", sw.slurm_options.time,
                    "with --slurm: time limit of each task (e.g. 2:00:00)");
  sweep->add_option("--mem", sw.slurm_options.mem, "with --slurm: memory of each task (e.g. 4G)");

  // A missing or unknown command, said in our words (CLI11 would say "A subcommand is
  // required" or list the word among unexpected arguments).
  const auto commands = app.get_subcommands([](CLI::App*) { return true; });
  std::string names;
  for (const CLI::App* c : commands) names += (names.empty() ? "" : ", ") + c->get_name();
  if (argc < 2) {
    std::cerr << "error: hawser needs a command: " << names << " (hawser --help)\n";
    return 2;
  }
  const std::string first = argv[1];
  if (first.empty() || first[0] != '-') {
    bool known = false;
    for (const CLI::App* c : commands) known = known || c->get_name() == first;
    if (!known) {
      std::cerr << "error: unknown command '" << first << "'; the commands are " << names
                << " (hawser --help)\n";
      return 2;
    }
  }
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : 2;
  }
  try {
    if (check->parsed()) return cmd_check(opt);
    if (design->parsed()) return cmd_design(opt, json);
    if (keys->parsed()) return cmd_keys(keys_prefix);
    if (run->parsed()) return cmd_run(opt, output, resume, overwrite);
    if (modes->parsed()) {
      if (!output.empty()) check_output_path(output, overwrite);
      return cmd_modes(opt, modes_k, output, json);
    }
    if (sweep->parsed()) return cmd_sweep(sw);
  } catch (const InputError& e) {
    std::cerr << e.what();
    if (std::string(e.what()).back() != '\n') std::cerr << '\n';
    return 2;
  } catch (const IntegratorFailure& e) {
    std::cerr << "error: integrator failed at t = " << e.time_s() << " s: " << e.what() << '\n';
    return 4;
  } catch (const std::exception& e) {
    std::cerr << "error: " << e.what() << '\n';
    return 1;
  }
  return 1;
}
