#include "solver/cli/sweep_folder.hpp"

#include <fcntl.h>
#include <unistd.h>

#include <ctime>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "solver/input/errors.hpp"
#include "solver/output/result_summary.hpp"

namespace hawser {

namespace fs = std::filesystem;

SweepFolder::SweepFolder(std::string dir) : dir_(std::move(dir)) {
  while (dir_.size() > 1 && dir_.back() == '/') dir_.pop_back();
}

void write_file_atomically(const std::string& path, const std::string& text) {
  const std::string tmp = path + ".tmp" + std::to_string(getpid());
  {
    std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
    out << text;
    if (!out.flush()) throw std::runtime_error("cannot write " + tmp);
  }
  fs::rename(tmp, path);
}

void SweepFolder::claim(const Study& st) const {
  nlohmann::ordered_json j;
  j["format"] = "hawser-sweep";
  j["study"] = st.name;
  j["study_file"] = st.file;
  j["scenario"] = st.scenario;
  j["fingerprint"] = st.fingerprint;
  j["varied_keys"] = st.varied_keys;
  for (const Override& o : st.common) j["set"][o.path] = o.value;
  j["variants"] = nlohmann::json::array();
  for (const Variant& v : st.variants) {
    nlohmann::ordered_json jv;
    jv["index"] = v.index;
    jv["id"] = v.id;
    jv["name"] = v.name;
    jv["overrides"] = nlohmann::ordered_json::object();
    for (const Override& o : v.overrides) jv["overrides"][o.path] = o.value;
    j["variants"].push_back(jv);
  }
  for (const auto& r : st.rank_by)
    j["rank_by"].push_back({{"metric", r.metric}, {"descending", r.descending}});
  for (const auto& l : st.limits)
    j["limits"].push_back(
        {{"metric", l.metric}, {l.at_least ? "at_least" : "at_most", l.bound}, {"text", l.text}});
  const std::string path = dir_ + "/study.json";
  if (std::ifstream in(path); in) {
    nlohmann::json old;
    try {
      in >> old;
    } catch (const nlohmann::json::exception&) {
      throw InputError("error: " + path + ": not a sweep's study file; choose another -o folder\n");
    }
    if (old.value("fingerprint", "") != st.fingerprint)
      throw InputError(
          "error: " + dir_ + " holds a sweep of another base scenario or other `set` values (" +
          old.value("study_file", std::string("?")) + "); choose another -o folder or remove it\n");
  }
  fs::create_directories(dir_ + "/logs");
  write_file_atomically(path, j.dump(1) + "\n");
}

VariantState SweepFolder::state(const Variant& v) const {
  if (fs::exists(result(v))) {
    try {
      return read_result_summary(result(v)).final() ? VariantState::finished
                                                    : VariantState::to_resume;
    } catch (const std::exception&) {
      return VariantState::to_run;  // unreadable: start it again
    }
  }
  const auto o = outcome(v);
  return o && o->exit_code != 0 ? VariantState::finished : VariantState::to_run;
}

std::optional<Outcome> SweepFolder::outcome(const Variant& v) const {
  std::ifstream in(outcome_file(v));
  if (!in) return std::nullopt;
  try {
    const nlohmann::json j = nlohmann::json::parse(in);
    return Outcome{j.at("exit_code").get<int>(), j.at("wall_s").get<double>(),
                   j.at("message").get<std::string>()};
  } catch (const nlohmann::json::exception&) {
    return std::nullopt;
  }
}

void SweepFolder::write_outcome(const Variant& v, const Outcome& o) const {
  const nlohmann::ordered_json j = {
      {"id", v.id}, {"exit_code", o.exit_code}, {"wall_s", o.wall_s}, {"message", o.message}};
  write_file_atomically(outcome_file(v), j.dump(1) + "\n");
}

void SweepFolder::discard_result(const Variant& v) const {
  std::error_code ec;
  fs::remove(result(v), ec);
  fs::remove_all(result(v) + ".parts", ec);
  fs::remove(dir_ + "/" + v.id + ".xmf", ec);
}

void SweepFolder::log_line(const std::string& text) const {
  char stamp[32];
  const std::time_t now = std::time(nullptr);
  std::tm utc{};
  gmtime_r(&now, &utc);
  std::strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%SZ", &utc);
  const std::string line =
      std::string(stamp) + " pid " + std::to_string(getpid()) + " " + text + "\n";
  // O_APPEND: lines of concurrent sweep processes (Slurm tasks) do not overwrite each other.
  const int fd = ::open((dir_ + "/sweep.log").c_str(), O_WRONLY | O_CREAT | O_APPEND, 0644);
  if (fd < 0) return;
  [[maybe_unused]] const ssize_t n = ::write(fd, line.data(), line.size());
  ::close(fd);
}

}  // namespace hawser
