#include "solver/input/study_reader.hpp"

#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>

#include "solver/input/units.hpp"
#include "solver/input/embedded_config.hpp"
#include "solver/input/errors.hpp"
#include "solver/input/key_reference.hpp"
#include "solver/input/scenario.hpp"
#include "solver/input/scenario_reader.hpp"
#include "solver/input/variant_id.hpp"

namespace hawser {
namespace {

namespace fs = std::filesystem;

const KeyReference& study_keys() {
  static const KeyReference ref = KeyReference::from_yaml(embedded_config().at("study_keys.yaml"));
  return ref;
}

/// n[key], or an empty node when absent (iterating an absent key throws in yaml-cpp).
YAML::Node get(const YAML::Node& n, const std::string& key) {
  return n[key] ? n[key] : YAML::Node(YAML::NodeType::Null);
}

std::string flow_text(const YAML::Node& n) {
  if (n.IsScalar()) return n.Scalar();
  YAML::Emitter em;
  em.SetMapFormat(YAML::Flow);
  em.SetSeqFormat(YAML::Flow);
  em << n;
  return em.c_str();
}

/// One axis of the product: its choices, each a list of overrides (and a name for strategies).
struct Axis {
  struct Choice {
    std::string name;
    std::vector<Override> overrides;
  };
  std::vector<Choice> choices;
};

class StudyWalker {
 public:
  StudyWalker(std::string file, std::vector<Problem>& problems)
      : file_(std::move(file)), problems_(problems) {}

  std::string at(const YAML::Node& n) const {
    if (n.Mark().is_null()) return file_;
    return file_ + ":" + std::to_string(n.Mark().line + 1) + ":" +
           std::to_string(n.Mark().column + 1);
  }
  void problem(const std::string& where, const std::string& key, const std::string& msg) {
    problems_.push_back({where, key.empty() ? "(top level)" : key, msg});
  }

  /// Checks a mapping against the study keys below `pattern`: unknown keys, types, required.
  void check_map(const YAML::Node& node, const std::string& pattern, const std::string& display) {
    if (!node.IsMap()) return problem(at(node), display, "expected a mapping of keys (key: value)");
    const KeyReference& ref = study_keys();
    std::set<std::string> seen;
    for (const auto& kv : node) {
      const std::string key = kv.first.Scalar();
      const std::string p = pattern.empty() ? key : pattern + "." + key;
      const std::string d = display.empty() ? key : display + "." + key;
      if (!seen.insert(key).second) {
        problem(at(kv.first), d, "key given twice");
        continue;
      }
      const KeySpec* spec = ref.find(p);
      if (!spec) {
        std::string hint;
        for (const KeySpec* c : ref.children(pattern))
          hint += (hint.empty() ? "" : ", ") + c->leaf();
        problem(at(kv.first), d, "unknown key (expected one of: " + hint + ")");
        continue;
      }
      check_value(*spec, kv.second, d);
    }
    for (const KeySpec* c : ref.children(pattern))
      if (c->required && !node[c->leaf()])
        problem(at(node), display.empty() ? c->leaf() : display + "." + c->leaf(),
                "missing: " + c->meaning);
  }

  void check_value(const KeySpec& spec, const YAML::Node& node, const std::string& display) {
    const KeyReference& ref = study_keys();
    if (spec.type == KeyType::list) {
      if (!node.IsSequence())
        return problem(at(node), display, "expected a list (- item per line)");
      for (std::size_t i = 0; i < node.size(); ++i) {
        const std::string d = display + "[" + std::to_string(i) + "]";
        const KeySpec* item = ref.find(spec.path + "[]");
        if (item && item->type == KeyType::map && ref.children(item->path).empty())
          check_overrides(node[i], d, false);
        else
          check_map(node[i], spec.path + "[]", d);
      }
    } else if (spec.type == KeyType::map) {
      if (ref.children(spec.path).empty())
        check_overrides(node, display,
                        spec.path == "set" || spec.path.find("[].set") != std::string::npos);
      else
        check_map(node, spec.path, display);
    } else if (!node.IsScalar()) {
      problem(at(node), display, "expected a single value");
    } else if (spec.type == KeyType::choice) {
      std::string list;
      bool ok = false;
      for (const auto& c : spec.choices) {
        ok = ok || c == node.Scalar();
        list += (list.empty() ? "" : ", ") + c;
      }
      if (!ok) problem(at(node), display, "'" + node.Scalar() + "' is not one of: " + list);
    }
  }

  /// A map of scenario overrides: keys are scenario paths; `single` maps take one value per
  /// key, the others (product, zip groups) a non-empty list of values.
  void check_overrides(const YAML::Node& node, const std::string& display, bool single) {
    if (!node.IsMap())
      return problem(at(node), display, "expected a mapping of scenario keys (key.path: value)");
    for (const auto& kv : node) {
      const std::string d = display + "." + kv.first.Scalar();
      if (!single && (!kv.second.IsSequence() || kv.second.size() == 0))
        problem(at(kv.second), d, "expected a list of values, e.g. [100 km/h, 150 km/h]");
    }
  }

 private:
  std::string file_;
  std::vector<Problem>& problems_;
};

std::vector<Override> overrides_of(const YAML::Node& map, const StudyWalker& w, bool named) {
  std::vector<Override> out;
  for (const auto& kv : map)
    out.push_back({kv.first.Scalar(), flow_text(kv.second), w.at(kv.second), named});
  return out;
}

std::vector<Axis> read_axes(const YAML::Node& root, const StudyWalker& w) {
  std::vector<Axis> axes;
  for (const auto& kv : get(root, "product")) {
    Axis a;
    for (const auto& v : kv.second)
      a.choices.push_back({"", {{kv.first.Scalar(), flow_text(v), w.at(v), false}}});
    axes.push_back(a);
  }
  for (const auto& group : get(root, "zip")) {
    Axis a;
    for (const auto& kv : group)
      for (std::size_t i = 0; i < kv.second.size(); ++i) {
        if (a.choices.size() <= i) a.choices.resize(i + 1);
        a.choices[i].overrides.push_back(
            {kv.first.Scalar(), flow_text(kv.second[i]), w.at(kv.second[i]), false});
      }
    axes.push_back(a);
  }
  if (get(root, "strategies").size() > 0) {
    Axis a;
    for (const auto& s : get(root, "strategies"))
      a.choices.push_back({s["name"].Scalar(), overrides_of(s["set"], w, true)});
    axes.push_back(a);
  }
  return axes;
}

/// Checks that do not fit the key table: equal zip lengths, names, keys varied twice.
void check_structure(const YAML::Node& root, StudyWalker& w) {
  for (std::size_t g = 0; g < get(root, "zip").size(); ++g) {
    std::size_t n = 0;
    for (const auto& kv : get(root, "zip")[g]) {
      if (n != 0 && kv.second.size() != n)
        w.problem(w.at(kv.second), "zip[" + std::to_string(g) + "]." + kv.first.Scalar(),
                  "has " + std::to_string(kv.second.size()) +
                      " values; the group's first list has " + std::to_string(n) +
                      " (zipped lists vary together and must be as long)");
      if (n == 0) n = kv.second.size();
    }
  }
  std::set<std::string> names;
  for (const char* list : {"strategies", "variants"})
    for (std::size_t i = 0; i < get(root, list).size(); ++i) {
      const YAML::Node n = get(root, list)[i]["name"];
      if (!n || !n.IsScalar()) continue;
      const std::string d = std::string(list) + "[" + std::to_string(i) + "].name";
      if (n.Scalar().empty() ||
          n.Scalar().find_first_not_of(
              "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789-_") !=
              std::string::npos)
        w.problem(w.at(n), d, "'" + n.Scalar() + "': use letters, digits, - and _ only");
      else if (!names.insert(n.Scalar()).second)
        w.problem(w.at(n), d, "the name '" + n.Scalar() + "' is given twice");
    }
  // A key on two axes (or in `set` and on an axis) would be ambiguous.
  std::map<std::string, std::string> axis_of;  // key path -> the axis that varies it
  auto claim = [&](const std::string& path, const std::string& axis, const YAML::Node& at) {
    const auto it = axis_of.find(path);
    if (it != axis_of.end() && it->second != axis)
      w.problem(w.at(at), path,
                "varied by " + it->second + " and by " + axis + " (vary each key on one axis)");
    else
      axis_of[path] = axis;
  };
  for (const auto& kv : get(root, "set")) claim(kv.first.Scalar(), "set", kv.first);
  for (const auto& kv : get(root, "product"))
    claim(kv.first.Scalar(), "product." + kv.first.Scalar(), kv.first);
  for (std::size_t g = 0; g < get(root, "zip").size(); ++g)
    for (const auto& kv : get(root, "zip")[g])
      claim(kv.first.Scalar(), "zip[" + std::to_string(g) + "]", kv.first);
  for (const auto& s : get(root, "strategies"))
    for (const auto& kv : get(s, "set")) claim(kv.first.Scalar(), "strategies", kv.first);
}

std::vector<Variant> expand(const std::vector<Axis>& axes, const YAML::Node& root,
                            const StudyWalker& w) {
  std::vector<Variant> out;
  bool any = !axes.empty();
  for (const Axis& a : axes) any = any && !a.choices.empty();  // an empty list is reported already
  if (any) {
    std::vector<std::size_t> pick(axes.size(), 0);  // odometer over the axes, the last fastest
    for (bool more = true; more;) {
      Variant v;
      for (std::size_t a = 0; a < axes.size(); ++a) {
        const Axis::Choice& c = axes[a].choices[pick[a]];
        if (!c.name.empty()) v.name += (v.name.empty() ? "" : "_") + c.name;
        v.overrides.insert(v.overrides.end(), c.overrides.begin(), c.overrides.end());
      }
      out.push_back(v);
      more = false;
      for (std::size_t a = axes.size(); a-- > 0;) {
        if (++pick[a] < axes[a].choices.size()) {
          more = true;
          break;
        }
        pick[a] = 0;
      }
    }
  }
  for (const auto& e : get(root, "variants"))
    out.push_back({0, "", e["name"].Scalar(), overrides_of(e["set"], w, true)});
  if (out.empty()) out.push_back(Variant{});
  for (std::size_t i = 0; i < out.size(); ++i) {
    out[i].index = i;
    out[i].id = variant_id(out[i].name, out[i].overrides);
  }
  return out;
}

/// The dimension of a /summary metric from its name's unit ending (config/study_keys.yaml).
std::string metric_dimension(const std::string& metric) {
  static const YAML::Node table =
      YAML::Load(embedded_config().at("study_keys.yaml"))["metric_units"];
  std::string best, dim = "dimensionless";
  if (metric.find("_per_") != std::string::npos) return dim;
  for (const auto& kv : table) {
    const std::string suffix = kv.first.Scalar();
    if (metric.size() > suffix.size() &&
        metric.compare(metric.size() - suffix.size(), suffix.size(), suffix) == 0 &&
        suffix.size() > best.size()) {
      best = suffix;
      dim = kv.second.Scalar();
    }
  }
  return dim;
}

void read_ranking(const YAML::Node& root, Study& st, StudyWalker& w) {
  for (const auto& r : get(root, "rank_by"))
    st.rank_by.push_back({r["metric"].Scalar(), r["order"].Scalar() == "descending"});
  for (std::size_t i = 0; i < get(root, "limits").size(); ++i) {
    const YAML::Node l = get(root, "limits")[i];
    const std::string d = "limits[" + std::to_string(i) + "]";
    if (!!l["at_least"] == !!l["at_most"]) {
      w.problem(w.at(l), d, "give one of at_least or at_most");
      continue;
    }
    const bool least = !!l["at_least"];
    const YAML::Node b = least ? l["at_least"] : l["at_most"];
    const std::string metric = l["metric"].Scalar();
    Limit lim{metric, least, 0.0, b.Scalar()};
    std::string why;
    if (!UnitTable::builtin().to_si(b.Scalar(), metric_dimension(metric), lim.bound, why)) {
      w.problem(w.at(b), d + (least ? ".at_least" : ".at_most"),
                why + " (the unit of " + metric + ")");
      continue;
    }
    st.limits.push_back(lim);
  }
}

/// Validates a variant as `hawser check BASE --set ...` would (the whole validation stage: a
/// climber beyond the tether's top is found here, not in the run), and rewrites each "--set p=v"
/// location in the messages to where the study wrote the value.
void validate_variant(const Study& st, const Variant& v, std::vector<std::string>& lines) {
  try {
    load_scenario(st.scenario, st.set_arguments(v));
  } catch (const InputError& e) {
    std::string msg = e.what();
    std::vector<Override> all = st.common;
    all.insert(all.end(), v.overrides.begin(), v.overrides.end());
    for (const Override& o : all) {
      const std::string from = "--set " + o.set_argument();
      for (auto pos = msg.find(from); pos != std::string::npos;
           pos = msg.find(from, pos + o.where.size()))
        msg.replace(pos, from.size(), o.where);
    }
    std::istringstream in(msg);
    for (std::string line; std::getline(in, line);)
      if (!line.empty() && std::find(lines.begin(), lines.end(), line) == lines.end())
        lines.push_back(line);
  }
}

}  // namespace

Study read_study(const std::string& file, long only) {
  std::vector<Problem> problems;
  StudyWalker w(file, problems);
  std::ifstream in(file);
  if (!in) throw InputError("error: " + file + ": (file): cannot open the study file\n");
  std::stringstream text;
  text << in.rdbuf();
  YAML::Node root;
  try {
    root = YAML::Load(text.str());
  } catch (const YAML::ParserException& e) {
    throw InputError("error: " + file + ":" + std::to_string(e.mark.line + 1) + ":" +
                     std::to_string(e.mark.column + 1) + ": (syntax): malformed YAML: " + e.msg +
                     "\n");
  }
  if (!root.IsMap())
    throw InputError("error: " + file +
                     ": (top level): a study is a mapping of keys (key: value)\n");
  w.check_map(root, "", "");
  if (!problems.empty()) throw InputError(format_problems(problems));
  check_structure(root, w);

  Study st;
  st.file = file;
  st.name = root["name"] ? root["name"].Scalar() : fs::path(file).stem().string();
  fs::path base = fs::path(root["scenario"].Scalar());
  if (base.is_relative()) base = fs::path(file).parent_path() / base;
  st.scenario = fs::absolute(base).lexically_normal().string();
  std::string base_text;
  if (std::ifstream sin(st.scenario); sin) {
    std::stringstream ss;
    ss << sin.rdbuf();
    base_text = ss.str();
  } else {
    w.problem(w.at(root["scenario"]), "scenario", "cannot open " + st.scenario);
  }
  if (get(root, "set")) st.common = overrides_of(get(root, "set"), w, false);
  st.variants = expand(read_axes(root, w), root, w);
  read_ranking(root, st, w);
  std::set<std::string> ids;
  for (const Variant& v : st.variants) {
    if (!ids.insert(v.id).second)
      w.problem(file, "variants",
                "two variants override the same keys with the same values (" + v.id + ")");
    for (const Override& o : v.overrides)
      if (std::find(st.varied_keys.begin(), st.varied_keys.end(), o.path) == st.varied_keys.end())
        st.varied_keys.push_back(o.path);
  }
  std::string fp = base_text;
  for (const Override& o : st.common) fp += "\n--set " + o.set_argument();
  st.fingerprint = short_hash(fp);
  if (!problems.empty()) throw InputError(format_problems(problems));
  std::vector<std::string> lines;  // a bad value shared by many variants is reported once
  for (const Variant& v : st.variants)
    if (only < 0 || static_cast<long>(v.index) == only) validate_variant(st, v, lines);
  if (!lines.empty()) {
    std::string all;
    for (const auto& l : lines) all += l + "\n";
    throw InputError(all);
  }
  return st;
}

}  // namespace hawser
