#include "solver/cli/slurm_array.hpp"

#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <sstream>
#include <stdexcept>

namespace hawser {

std::string array_ranges(const std::vector<std::size_t>& ix) {
  std::string out;
  for (std::size_t i = 0; i < ix.size();) {
    std::size_t j = i;
    while (j + 1 < ix.size() && ix[j + 1] == ix[j] + 1) ++j;
    out += (out.empty() ? "" : ",") + std::to_string(ix[i]) +
           (j > i ? "-" + std::to_string(ix[j]) : "");
    i = j + 1;
  }
  return out;
}

namespace {
std::string quoted(const std::string& s) {  // one word for the shell
  std::string q = "'";
  for (const char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}
}  // namespace

std::string sbatch_script(const std::string& job_name, const std::vector<std::size_t>& indices,
                          const std::string& program, const std::string& study,
                          const std::string& dir, const SlurmOptions& opt) {
  std::ostringstream s;
  s << "#!/bin/bash\n"
    << "# A hawser sweep as a Slurm job array: one task per variant (written by hawser sweep "
       "--slurm).\n"
    << "# Each task runs one variant in its own `hawser run`; resubmitting runs only what is "
       "unfinished.\n"
    << "# When the array is done: hawser sweep " << quoted(study) << " --collect -o " << quoted(dir)
    << "\n"
    << "#SBATCH --job-name=" << job_name << "\n"
    << "#SBATCH --array=" << array_ranges(indices) << "\n"
    << "#SBATCH --ntasks=1\n"
    << "#SBATCH --cpus-per-task=1\n"
    << "#SBATCH --output=" << dir << "/logs/slurm-%A_%a.out\n";
  if (!opt.partition.empty()) s << "#SBATCH --partition=" << opt.partition << "\n";
  if (!opt.time.empty()) s << "#SBATCH --time=" << opt.time << "\n";
  if (!opt.mem.empty()) s << "#SBATCH --mem=" << opt.mem << "\n";
  s << "exec " << quoted(program) << " sweep " << quoted(study)
    << " --variant \"$SLURM_ARRAY_TASK_ID\" -o " << quoted(dir) << "\n";
  return s.str();
}

bool sbatch_available() {
  const char* path = std::getenv("PATH");
  std::istringstream dirs(path ? path : "");
  for (std::string d; std::getline(dirs, d, ':');)
    if (!d.empty() && access((d + "/sbatch").c_str(), X_OK) == 0) return true;
  return false;
}

std::string submit_sbatch(const std::string& script_path) {
  if (!sbatch_available())
    throw std::runtime_error("sbatch is not on PATH (is this a Slurm cluster's login node?)");
  const std::string cmd = "sbatch --parsable " + quoted(script_path) + " 2>&1";
  FILE* p = popen(cmd.c_str(), "r");
  if (!p) throw std::runtime_error("cannot start sbatch");
  std::string out;
  char buf[256];
  while (std::fgets(buf, sizeof buf, p)) out += buf;
  const int rc = pclose(p);
  while (!out.empty() && (out.back() == '\n' || out.back() == '\r')) out.pop_back();
  if (rc != 0) throw std::runtime_error("sbatch refused the job: " + out);
  return out.substr(0, out.find(';'));  // --parsable: "jobid[;cluster]"
}

}  // namespace hawser
