#include "solver/cli/sweep_pool.hpp"

#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <chrono>
#include <cstdio>
#include <deque>
#include <map>
#include <memory>
#include <thread>

#include "solver/cli/variant_process.hpp"

namespace hawser {
namespace {

/// The progress line of a sweep: counts and an ETA from the mean wall time of runs ended.
class SweepProgress {
 public:
  SweepProgress(std::size_t total, int jobs, bool enabled)
      : total_(total), jobs_(jobs), enabled_(enabled) {}
  void ended(double wall_s, bool failed) {
    ++finished_;
    failed_ += failed;
    wall_sum_s_ += wall_s;
  }
  void show(std::size_t running, bool force = false) {
    if (!enabled_) return;
    const auto now = std::chrono::steady_clock::now();
    if (!force && printed_ && now - last_ < std::chrono::milliseconds(500)) return;
    last_ = now;
    printed_ = true;
    char eta[32] = "?";
    if (finished_ > 0) {
      const double left = static_cast<double>(total_ - finished_) * wall_sum_s_ / finished_ / jobs_;
      const long s = static_cast<long>(left + 0.5);
      std::snprintf(eta, sizeof eta, "%ld:%02ld:%02ld", s / 3600, (s / 60) % 60, s % 60);
    }
    std::fprintf(stderr, "\r  sweep: %zu of %zu finished, %zu running, %zu failed, ETA %s   ",
                 finished_, total_, running, failed_, eta);
    std::fflush(stderr);
  }
  void close() {
    if (enabled_ && printed_) std::fprintf(stderr, "\n");
  }

 private:
  std::size_t total_, finished_ = 0, failed_ = 0;
  int jobs_;
  bool enabled_, printed_ = false;
  double wall_sum_s_ = 0;
  std::chrono::steady_clock::time_point last_;
};

}  // namespace

PoolResult run_variants(const Study& st, const std::vector<const Variant*>& todo,
                        const SweepFolder& folder, int jobs, bool progress) {
  std::deque<std::pair<const Variant*, bool>> queue;  // (variant, resume its file)
  for (const Variant* v : todo) {
    const VariantState s = folder.state(*v);
    if (s == VariantState::finished) continue;
    if (s == VariantState::to_run) folder.discard_result(*v);  // an unreadable leftover
    queue.emplace_back(v, s == VariantState::to_resume);
  }
  PoolResult res;
  SweepProgress bar(queue.size(), jobs, progress);
  std::map<pid_t, std::unique_ptr<VariantProcess>> running;
  while (!queue.empty() || !running.empty()) {
    while (!queue.empty() && static_cast<int>(running.size()) < jobs) {
      const auto [v, resume] = queue.front();
      queue.pop_front();
      auto p = std::make_unique<VariantProcess>(st, *v, folder, resume);
      folder.log_line("start " + v->id + (resume ? " resume" : " new"));
      ++res.started;
      running[p->pid()] = std::move(p);
    }
    bar.show(running.size());
    int status = 0;
    // Without a progress line, wait for the next run to end; with one, look every 20 ms: a
    // run's end noticed late keeps a core idle, which counts on studies of short runs.
    const pid_t pid = waitpid(-1, &status, progress ? WNOHANG : 0);
    if (pid == 0 || (pid < 0 && errno == EINTR)) {
      std::this_thread::sleep_for(std::chrono::milliseconds(20));
      continue;
    }
    if (pid < 0) break;  // no child left (cannot happen while `running` is not empty)
    const auto it = running.find(pid);
    if (it == running.end()) continue;
    const VariantProcess& p = *it->second;
    const Outcome o = p.finish(status);
    folder.log_line("end " + p.variant().id + " exit " + std::to_string(o.exit_code) + " wall " +
                    std::to_string(o.wall_s) + " s");
    if (p.resumed() && o.exit_code == 2 && folder.state(p.variant()) != VariantState::finished) {
      // The file cannot be continued (another scenario, another build): run it anew.
      folder.log_line("resume refused for " + p.variant().id + ": " + o.message +
                      "; starting anew");
      folder.discard_result(p.variant());
      queue.emplace_front(&p.variant(), false);
    } else {
      folder.write_outcome(p.variant(), o);
      res.failed += o.exit_code != 0;
      res.last_exit_code = o.exit_code;
      bar.ended(o.wall_s, o.exit_code != 0);
    }
    running.erase(it);
  }
  bar.show(0, true);
  bar.close();
  return res;
}

}  // namespace hawser
