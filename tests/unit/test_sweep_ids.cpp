// Sweeps: stable variant ids and the Slurm array's index ranges.
//
// A variant's id names its result file, so a sweep started again (or collected on another
// machine) finds its results only if the id is the same: the hash is checked against the
// published FNV-1a test vectors (Fowler, Noll, Vo; "" -> cbf29ce484222325, "a" ->
// af63dc4c8601ec8c, "foobar" -> 85944171f73967e8, recalled from memory and recomputed with an
// independent few-line Python implementation), and one id is pinned as a regression value.
#include "catch_compat.hpp"

#include "solver/cli/slurm_array.hpp"
#include "solver/input/variant_id.hpp"

using namespace hawser;

TEST_CASE("FNV-1a 64 matches the published test vectors", "[sweep]") {
  CHECK(fnv1a64("") == 0xcbf29ce484222325ULL);
  CHECK(fnv1a64("a") == 0xaf63dc4c8601ec8cULL);
  CHECK(fnv1a64("foobar") == 0x85944171f73967e8ULL);
  CHECK(short_hash("foobar") == "85944171");
}

TEST_CASE("variant ids: readable slug, hash of the overrides, stable", "[sweep]") {
  const std::vector<Override> o = {{"schedules[0].cruise_speed", "100 km/h", "a.yaml:3:4", false},
                                   {"material.damping_time", "0.5 s", "a.yaml:4:4", false}};
  // Pinned: results of earlier sweeps are found by this name.
  CHECK(variant_id("", o) == "cruise_speed-100kmh_damping_time-0p5s-f850a064");
  // Where the study wrote a value does not change the id; the value and the name do.
  std::vector<Override> moved = o;
  moved[0].where = "b.yaml:9:9";
  CHECK(variant_id("", moved) == variant_id("", o));
  std::vector<Override> other = o;
  other[1].value = "2 s";
  CHECK(variant_id("", other) != variant_id("", o));
  CHECK(variant_id("brisk", o) != variant_id("", o));
  // A named variant's own overrides are known by its name in the slug.
  std::vector<Override> named = o;
  for (auto& x : named) x.named = true;
  CHECK(variant_id("heavy", named).rfind("heavy-", 0) == 0);
  CHECK(variant_id("", {}).rfind("base-", 0) == 0);
}

TEST_CASE("Slurm array ranges", "[sweep]") {
  CHECK(array_ranges({0, 1, 2, 3, 5, 7, 8, 9}) == "0-3,5,7-9");
  CHECK(array_ranges({4}) == "4");
  CHECK(array_ranges({}).empty());
  const std::string s =
      sbatch_script("job", {1, 2}, "/bin/hawser", "/s/st.yaml", "/o", {"p", "1:00", "2G"});
  CHECK(s.find("#SBATCH --array=1-2\n") != std::string::npos);
  CHECK(s.find("#SBATCH --partition=p\n#SBATCH --time=1:00\n#SBATCH --mem=2G\n") !=
        std::string::npos);
  CHECK(
      s.find("exec '/bin/hawser' sweep '/s/st.yaml' --variant \"$SLURM_ARRAY_TASK_ID\" -o '/o'") !=
      std::string::npos);
}
