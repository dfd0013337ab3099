#include "solver/cli/cmd_sweep.hpp"

#include <unistd.h>

#include <filesystem>
#include <iostream>
#include <thread>

#include "solver/input/errors.hpp"
#include "solver/integration/progress.hpp"
#include "solver/input/study_reader.hpp"
#include "solver/cli/sweep_folder.hpp"
#include "solver/cli/sweep_pool.hpp"
#include "solver/cli/sweep_tables.hpp"
#include "solver/input/variant_id.hpp"

namespace hawser {
namespace {

namespace fs = std::filesystem;

std::string default_folder(const std::string& study) {
  return fs::path(study).stem().string() + "-sweep";
}

/// summary.csv and ranking.md from the folder; prints the ranking. True if every variant
/// has a final result.
bool write_tables(const Study& st, const SweepFolder& folder) {
  const std::vector<SweepRow> rows = gather_rows(st, folder);
  write_file_atomically(folder.dir() + "/summary.csv", summary_csv(st, rows));
  const std::string md = ranking_markdown(st, rows);
  write_file_atomically(folder.dir() + "/ranking.md", md);
  std::cout << md << "\ntables: " << folder.dir() << "/summary.csv, " << folder.dir()
            << "/ranking.md\n";
  bool all = true;
  std::size_t missing = 0;
  for (const SweepRow& r : rows)
    if (!r.result.final()) all = false, ++missing;
  if (!all) std::cout << missing << " of " << rows.size() << " variants have no final result\n";
  return all;
}

int run_slurm(const Study& st, const SweepFolder& folder, const SweepOptions& opt) {
  std::vector<std::size_t> todo;
  for (const Variant& v : st.variants)
    if (folder.state(v) != VariantState::finished) todo.push_back(v.index);
  if (todo.empty()) {
    std::cout << "every variant is finished; collect the tables with: hawser sweep " << opt.study
              << " --collect -o " << folder.dir() << "\n";
    return 0;
  }
  const std::string program = fs::read_symlink("/proc/self/exe").string();
  const std::string job = "hawser-" + short_hash(st.file + st.fingerprint);
  const std::string script =
      sbatch_script(job, todo, program, fs::absolute(opt.study).lexically_normal().string(),
                    fs::absolute(folder.dir()).lexically_normal().string(), opt.slurm_options);
  const std::string path = folder.dir() + "/sweep.sbatch";
  write_file_atomically(path, script);
  if (opt.dry_run) {
    std::cout << script;
    return 0;
  }
  try {
    const std::string id = submit_sbatch(path);
    std::cout << "submitted job array " << id << " (" << todo.size() << " variants): " << path
              << "\nwhen it is done: hawser sweep " << opt.study << " --collect -o " << folder.dir()
              << "\n";
    return 0;
  } catch (const std::runtime_error& e) {
    std::cerr << "error: " << e.what() << "; the script is " << path
              << " (submit it yourself, or use --dry-run)\n";
    return 1;
  }
}

}  // namespace

int cmd_sweep(const SweepOptions& opt) {
  if (opt.dry_run && !opt.slurm) throw InputError("error: --dry-run goes with --slurm\n");
  if (static_cast<int>(opt.slurm) + static_cast<int>(opt.collect) +
          static_cast<int>(opt.variant >= 0) >
      1)
    throw InputError("error: give one of --slurm, --collect and --variant\n");
  const Study st = read_study(opt.study, opt.variant);
  if (opt.variant >= 0 && static_cast<std::size_t>(opt.variant) >= st.variants.size())
    throw InputError("error: --variant " + std::to_string(opt.variant) + ": the study has " +
                     std::to_string(st.variants.size()) + " variants (0 to " +
                     std::to_string(st.variants.size() - 1) + ")\n");
  const SweepFolder folder(opt.output.empty() ? default_folder(opt.study) : opt.output);
  if (opt.collect) {
    if (!fs::exists(folder.dir() + "/study.json"))
      throw InputError("error: " + folder.dir() + ": no sweep there (no study.json)\n");
    folder.claim(st);
    return write_tables(st, folder) ? 0 : 1;
  }
  folder.claim(st);
  if (opt.slurm) return run_slurm(st, folder, opt);
  if (opt.variant >= 0) {
    const Variant& v = st.variants[static_cast<std::size_t>(opt.variant)];
    const PoolResult r = run_variants(st, {&v}, folder, 1, false);
    std::cout << "variant " << v.index << " " << v.id << ": "
              << (r.started ? "exit " + std::to_string(r.last_exit_code)
                            : std::string("already finished"))
              << "\n";
    return r.last_exit_code;
  }
  const int jobs =
      opt.jobs > 0 ? opt.jobs : static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  std::vector<const Variant*> all;
  for (const Variant& v : st.variants) all.push_back(&v);
  std::cout << "sweep " << st.name << ": " << st.variants.size() << " variants, " << jobs
            << " at once, in " << folder.dir() << "\n"
            << std::flush;
  const PoolResult r = run_variants(st, all, folder, jobs, stderr_is_terminal());
  std::cout << r.started << " runs started, " << r.failed << " failed\n";
  return write_tables(st, folder) ? 0 : 1;
}

}  // namespace hawser
