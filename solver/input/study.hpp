#pragma once
// A study (`hawser sweep STUDY.yaml`) after validation: the base scenario, the variants to run
// (each a list of scenario overrides, validated as `--set` would validate them), the metrics
// to rank them by and the limits each must hold. Plain values; built by StudyReader.
#include <string>
#include <vector>

namespace hawser {

/// One scenario override, as `--set path=value` takes it, with where the study wrote it.
struct Override {
  std::string path;    // scenario key path, e.g. "schedules[0].cruise_speed"
  std::string value;   // the value's YAML text (flow style), e.g. "150 km/h" or "[5 t, 4 t]"
  std::string where;   // study.yaml:line:column of the value
  bool named = false;  // from a strategy or named variant (its name stands for it in the slug)
  std::string set_argument() const { return path + "=" + value; }
};

struct Variant {
  std::size_t index = 0;  // position in the study's order (Slurm's array task id)
  std::string id;         // stable: readable slug and hash of `overrides` (variant_id.hpp)
  std::string name;       // strategy and/or explicit variant name ("" if none)
  std::vector<Override> overrides;  // this variant's own, in the study's key order
};

struct RankKey {
  std::string metric;       // a /summary attribute
  bool descending = false;  // true: the largest value ranks first
};

struct Limit {
  std::string metric;     // a /summary attribute
  bool at_least = false;  // true: value >= bound; false: value <= bound
  double bound = 0.0;     // SI (the metric's unit)
  std::string text;       // as written, for tables ("500 km")
};

struct Study {
  std::string file;  // the study file as given
  std::string name;
  std::string scenario;          // the base scenario's path (absolute, so resumed runs match)
  std::vector<Override> common;  // `set`: applied to every variant, before its own
  std::vector<std::string> varied_keys;  // every key path a variant overrides, in study order
  std::vector<Variant> variants;
  std::vector<RankKey> rank_by;
  std::vector<Limit> limits;
  std::string fingerprint;  // hash of the base scenario text and `set`: what ids assume fixed

  /// `--set` arguments of a variant: the common overrides, then its own.
  std::vector<std::string> set_arguments(const Variant& v) const {
    std::vector<std::string> out;
    for (const Override& o : common) out.push_back(o.set_argument());
    for (const Override& o : v.overrides) out.push_back(o.set_argument());
    return out;
  }
};

}  // namespace hawser
