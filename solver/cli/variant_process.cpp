#include "solver/cli/variant_process.hpp"

#include <fcntl.h>
#include <signal.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstring>
#include <fstream>
#include <stdexcept>
#include <vector>

namespace hawser {

VariantProcess::VariantProcess(const Study& st, const Variant& v, const SweepFolder& folder,
                               bool resume)
    : variant_(&v), folder_(&folder), resume_(resume), start_(std::chrono::steady_clock::now()) {
  std::vector<std::string> args = {"hawser", "run", st.scenario};
  for (const std::string& s : st.set_arguments(v)) {
    args.push_back("--set");
    args.push_back(s);
  }
  args.push_back(resume ? "--resume" : "-o");
  args.push_back(folder.result(v));
  if (!resume) args.push_back("--overwrite");  // the sweep decided this variant runs anew
  std::vector<char*> argv;
  for (std::string& a : args) argv.push_back(a.data());
  argv.push_back(nullptr);
  const std::string log = folder.log(v);
  const pid_t parent = getpid();
  pid_ = fork();
  if (pid_ < 0) throw std::runtime_error(std::string("fork: ") + std::strerror(errno));
  if (pid_ == 0) {
    // The child: only async-signal-safe calls until exec.
    prctl(PR_SET_PDEATHSIG, SIGKILL);
    if (getppid() != parent) _exit(127);  // the parent died before prctl took effect
    const int fd = ::open(log.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0644);
    if (fd >= 0) {
      dup2(fd, STDOUT_FILENO);
      dup2(fd, STDERR_FILENO);
      ::close(fd);
    }
    execv("/proc/self/exe", argv.data());
    _exit(127);
  }
}

namespace {
// The run's own words: its last "error:" line, else its last non-empty line.
std::string last_message(const std::string& log) {
  std::ifstream in(log);
  std::string line, last, error;
  while (std::getline(in, line)) {
    if (line.find_first_not_of(" \r\t") == std::string::npos) continue;
    last = line;
    if (line.rfind("error:", 0) == 0) error = line;
  }
  return error.empty() ? last : error;
}
}  // namespace

Outcome VariantProcess::finish(int wait_status) const {
  Outcome o;
  o.wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
  if (WIFEXITED(wait_status))
    o.exit_code = WEXITSTATUS(wait_status);
  else if (WIFSIGNALED(wait_status))
    o.exit_code = 128 + WTERMSIG(wait_status);
  if (o.exit_code != 0)
    o.message = last_message(folder_->log(*variant_));  // success needs no words
  if (WIFSIGNALED(wait_status))
    o.message = "killed by signal " + std::to_string(WTERMSIG(wait_status)) + " (" +
                strsignal(WTERMSIG(wait_status)) + ")" +
                (o.message.empty() ? "" : "; last said: " + o.message);
  return o;
}

}  // namespace hawser
