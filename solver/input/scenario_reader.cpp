#include "solver/input/scenario_reader.hpp"

#include <yaml-cpp/yaml.h>

#include <cmath>
#include <fstream>
#include <set>
#include <sstream>

#include "solver/input/units.hpp"
#include "solver/input/embedded_config.hpp"
#include "solver/input/key_reference.hpp"

namespace hawser {
namespace {

/// True if `s` is well-formed UTF-8 (RFC 3629: no overlong forms, no surrogates, <= U+10FFFF).
bool valid_utf8(const std::string& s) {
  std::size_t i = 0;
  while (i < s.size()) {
    const unsigned char c = static_cast<unsigned char>(s[i]);
    int n = 0;
    unsigned cp = 0;
    if (c < 0x80) {
      ++i;
      continue;
    } else if ((c & 0xE0) == 0xC0) {
      n = 1, cp = c & 0x1F;
    } else if ((c & 0xF0) == 0xE0) {
      n = 2, cp = c & 0x0F;
    } else if ((c & 0xF8) == 0xF0) {
      n = 3, cp = c & 0x07;
    } else {
      return false;
    }
    for (int k = 1; k <= n; ++k) {
      if (i + k >= s.size()) return false;
      const unsigned char d = static_cast<unsigned char>(s[i + k]);
      if ((d & 0xC0) != 0x80) return false;
      cp = (cp << 6) | (d & 0x3F);
    }
    static const unsigned kMin[] = {0, 0x80, 0x800, 0x10000};
    if (cp < kMin[n] || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) return false;
    i += static_cast<std::size_t>(n) + 1;
  }
  return true;
}

std::string location(const std::string& file, const YAML::Mark& m) {
  if (m.is_null()) return file;
  return file + ":" + std::to_string(m.line + 1) + ":" + std::to_string(m.column + 1);
}

std::string fmt_number(double v) {
  std::ostringstream os;
  os.precision(6);
  os << v;
  return os.str();
}

/// Walks one YAML document against the key reference, recording values and problems.
class Validator {
 public:
  Validator(const KeyReference& ref, std::vector<Problem>& problems) : ref_(ref), problems_(problems) {}

  /// `origin` maps display paths given or created by --set to its text (key.path=value);
  /// `where_file` names the file.
  void validate_root(const YAML::Node& root, const std::string& where_file,
                     const std::map<std::string, std::string>& origin) {
    origin_ = &origin;
    file_ = where_file;
    ScenarioValue rv;
    rv.type = KeyType::map;
    rv.where = location(file_, root.Mark());
    values_.set("", rv);
    walk_map(root, "", "");
    fill_defaults_and_required();
  }

  ScenarioValues& values() { return values_; }

  /// Entries of a table (planets.yaml): validated like the inline form under `pattern`.
  void set_table_location(const std::string& table_file) { table_file_ = table_file; }

 private:
  std::string where(const std::string& display, const YAML::Node& node) const {
    for (const auto& o : *origin_)
      if (display == o.first || display.rfind(o.first + ".", 0) == 0 || display.rfind(o.first + "[", 0) == 0)
        return "--set " + o.second;
    if (node.Mark().is_null()) return file_;
    return location(node_file(node), node.Mark());
  }
  // Nodes copied in from a config table carry their mark in that table.
  std::string node_file(const YAML::Node&) const { return in_table_ ? table_file_ : file_; }

  void problem(const std::string& where, const std::string& key, const std::string& msg) {
    problems_.push_back({where, key.empty() ? "(top level)" : key, msg});
  }

  static std::string join(const std::string& a, const std::string& b) { return a.empty() ? b : a + "." + b; }

  void walk_map(const YAML::Node& node, const std::string& pattern, const std::string& display) {
    if (!node.IsMap()) {
      problem(where(display, node), display, "expected a mapping of keys (key: value)");
      return;
    }
    std::set<std::string> seen;
    for (const auto& kv : node) {
      const std::string key = kv.first.Scalar();
      const std::string p = join(pattern, key), d = join(display, key);
      if (!seen.insert(key).second) {
        problem(where(d, kv.first), d, "key given twice");
        continue;
      }
      // A dotted key (simulation.duration: 1 min) would name the nested key and silently
      // override it; a scenario file writes keys nested (--set takes the dotted form).
      if (key.find_first_of(".[]") != std::string::npos) {
        problem(where(d, kv.first), d,
                "a key in the file is one word; write nested keys as a block (the dotted form "
                "is for --set)");
        continue;
      }
      const KeySpec* spec = ref_.find(p);
      if (!spec) {
        std::string hint;
        for (const KeySpec* c : ref_.children(pattern)) hint += (hint.empty() ? "" : ", ") + c->leaf();
        problem(where(d, kv.first), d, "unknown key" + (hint.empty() ? std::string() : " (expected one of: " + hint + ")"));
        continue;
      }
      walk_value(*spec, kv.second, d, where(d, kv.first));
    }
    present_maps_.push_back({pattern, display});
  }

  // `w` is where the key was written: problems with the value point there. One reader per key
  // type; each stores the value, or reports a problem and leaves the key marked invalid.
  void walk_value(const KeySpec& spec, const YAML::Node& node, const std::string& display, const std::string& w) {
    ScenarioValue v;
    v.type = spec.type;
    v.where = w;
    // A key with a bad value is present all the same: no second "missing" message for it.
    ScenarioValue invalid = v;
    invalid.invalid = true;
    values_.set(display, invalid);
    switch (spec.type) {
      case KeyType::map: return read_map(spec, node, display, v);
      case KeyType::name_or_map: return read_name_or_map(spec, node, display, v);
      case KeyType::list: return read_list(spec, node, display, v);
      case KeyType::vector3:
      case KeyType::integer_list:
      case KeyType::quantity_list: return read_sequence(spec, node, display, v);
      case KeyType::string:
      case KeyType::boolean:
      case KeyType::choice:
      case KeyType::integer:
      case KeyType::quantity: break;
    }
    if (!node.IsScalar()) {
      problem(w, display, "expected a single value, got " + std::string(node.IsMap()        ? "a mapping"
                                                                        : node.IsSequence() ? "a list"
                                                                                            : "nothing (null)"));
      return;
    }
    const std::string& s = node.Scalar();
    bool ok = true;
    switch (spec.type) {
      case KeyType::string: ok = read_string(s, display, v); break;
      case KeyType::boolean: ok = read_boolean(s, display, v); break;
      case KeyType::choice: ok = read_choice(spec, s, display, v); break;
      case KeyType::integer: ok = read_integer(spec, s, display, v); break;
      case KeyType::quantity: ok = read_quantity(spec, s, display, v); break;
      default: break;
    }
    if (ok) values_.set(display, v);
  }

  void read_map(const KeySpec& spec, const YAML::Node& node, const std::string& display, ScenarioValue& v) {
    values_.set(display, v);
    walk_map(node, spec.path, display);
  }

  void read_name_or_map(const KeySpec& spec, const YAML::Node& node, const std::string& display, ScenarioValue& v) {
    if (node.IsScalar()) {
      resolve_named(spec, node, display, v.where);
      return;
    }
    v.text = "inline";
    read_map(spec, node, display, v);
  }

  void read_list(const KeySpec& spec, const YAML::Node& node, const std::string& display, ScenarioValue& v) {
    if (!node.IsSequence()) {
      problem(v.where, display, "expected a list (- item per line)");
      return;
    }
    v.integer = static_cast<long long>(node.size());
    values_.set(display, v);
    for (std::size_t i = 0; i < node.size(); ++i) {
      const std::string d = display + "[" + std::to_string(i) + "]";
      ScenarioValue item;
      item.type = KeyType::map;
      item.where = where(d, node[i]);
      values_.set(d, item);
      walk_map(node[i], spec.path + "[]", d);
    }
  }

  /// vector3, integer_list, quantity_list.
  void read_sequence(const KeySpec& spec, const YAML::Node& node, const std::string& display, ScenarioValue& v) {
    const std::string& w = v.where;
    const bool vector3 = spec.type == KeyType::vector3, integers = spec.type == KeyType::integer_list;
    if (!node.IsSequence() || (vector3 && node.size() != 3) || node.size() == 0)
      return problem(w, display, vector3    ? "expected a list of three values [x, y, z]"
                                 : integers ? "expected a list of whole numbers [1, 5, 9]"
                                            : "expected a list of values [20 t, 15 t]");
    for (const auto& item : node) {
      if (!item.IsScalar()) return problem(w, display, "expected plain values in the list");
      if (!integers) {
        double x = 0;
        std::string why;
        if (!UnitTable::builtin().to_si(item.Scalar(), spec.dimension, x, why)) return problem(w, display, why);
        v.vector.push_back(x);
      } else {
        char* end = nullptr;
        const long long n = std::strtoll(item.Scalar().c_str(), &end, 10);
        if (item.Scalar().empty() || *end != '\0' || n < 0)
          return problem(w, display, "expected whole numbers >= 0, got '" + item.Scalar() + "'");
        v.vector.push_back(static_cast<double>(n));
      }
    }
    values_.set(display, v);
  }

  /// Text goes into result files as UTF-8 (HDF5 attributes readers decode): refuse anything else.
  bool read_string(const std::string& s, const std::string& display, ScenarioValue& v) {
    if (!valid_utf8(s)) return problem(v.where, display, "not valid UTF-8 text"), false;
    v.text = s;
    return true;
  }

  bool read_boolean(const std::string& s, const std::string& display, ScenarioValue& v) {
    if (s == "true" || s == "yes" || s == "on") v.boolean = true;
    else if (s == "false" || s == "no" || s == "off") v.boolean = false;
    else return problem(v.where, display, "expected true or false, got '" + s + "'"), false;
    return true;
  }

  bool read_choice(const KeySpec& spec, const std::string& s, const std::string& display, ScenarioValue& v) {
    std::string list;
    for (const auto& c : spec.choices) {
      if (c == s) {
        v.text = s;
        return true;
      }
      list += (list.empty() ? "" : ", ") + c;
    }
    return problem(v.where, display, "'" + s + "' is not one of: " + list), false;
  }

  bool read_integer(const KeySpec& spec, const std::string& s, const std::string& display, ScenarioValue& v) {
    char* end = nullptr;
    const long long n = std::strtoll(s.c_str(), &end, 10);
    if (s.empty() || *end != '\0')
      return problem(v.where, display, "expected a whole number, got '" + s + "'"), false;
    v.integer = n;
    v.number = static_cast<double>(n);
    return check_limits(spec, v.number, v.where, display);
  }

  bool read_quantity(const KeySpec& spec, const std::string& s, const std::string& display, ScenarioValue& v) {
    for (const auto& kw : spec.keywords)
      if (s == kw) {
        v.text = kw;
        return true;
      }
    std::string why;
    if (!UnitTable::builtin().to_si(s, spec.dimension, v.number, why)) {
      if (!spec.keywords.empty()) {
        why += " or one of the words:";
        for (const auto& k : spec.keywords) why += " " + k;
      }
      return problem(v.where, display, why), false;
    }
    return check_limits(spec, v.number, v.where, display);
  }

  bool check_limits(const KeySpec& spec, double x, const std::string& w, const std::string& display) {
    const std::string unit = spec.type == KeyType::quantity ? " " + UnitTable::builtin().si_unit(spec.dimension) : "";
    const std::string u = unit == " 1" ? "" : unit;
    if (spec.min && x < *spec.min) return problem(w, display, "must be at least " + fmt_number(*spec.min) + u + ", got " + fmt_number(x) + u), false;
    if (spec.max && x > *spec.max) return problem(w, display, "must be at most " + fmt_number(*spec.max) + u + ", got " + fmt_number(x) + u), false;
    if (spec.min_exclusive && x <= *spec.min_exclusive) return problem(w, display, "must be greater than " + fmt_number(*spec.min_exclusive) + u + ", got " + fmt_number(x) + u), false;
    if (spec.max_exclusive && x >= *spec.max_exclusive) return problem(w, display, "must be less than " + fmt_number(*spec.max_exclusive) + u + ", got " + fmt_number(x) + u), false;
    return true;
  }

  void resolve_named(const KeySpec& spec, const YAML::Node& node, const std::string& display, const std::string& w) {
    const std::string name = node.Scalar();
    const auto& files = embedded_config();
    const auto f = files.find(spec.table);
    const YAML::Node table = YAML::Load(f->second);
    const YAML::Node entries = table.begin()->second;  // the one top-level mapping (planets: ...)
    if (!entries[name]) {
      std::string list;
      for (const auto& e : entries) list += (list.empty() ? "" : ", ") + e.first.as<std::string>();
      problem(w, display, "no entry '" + name + "' in config/" + spec.table + " (known: " + list + ")");
      return;
    }
    ScenarioValue v;
    v.type = spec.type;
    v.text = name;
    v.where = w;
    values_.set(display, v);
    resolved_[display] = entries[name];
    // Table entries are validated like inline ones; their problems point into the table.
    const bool was = in_table_;
    const std::string saved_file = table_file_;
    in_table_ = true;
    table_file_ = "config/" + spec.table;
    const auto* saved_origin = origin_;
    static const std::map<std::string, std::string> none;
    origin_ = &none;
    walk_map(entries[name], spec.path, display);
    origin_ = saved_origin;
    in_table_ = was;
    table_file_ = saved_file;
  }

  void fill_defaults_and_required() {
    const auto& units = UnitTable::builtin();
    // An absent optional map (model:, field:) stands for all its defaults.
    for (const auto& k : ref_.all()) {
      if (k.type != KeyType::map || k.required || !k.required_when_key.empty() || k.path.find('[') != std::string::npos) continue;
      if (values_.has(k.path) || !(k.parent().empty() || values_.has(k.parent()))) continue;
      present_maps_.push_back({k.path, k.path});
      implicit_maps_.insert(k.path);
    }
    // Defaults first, so that required_when conditions see them.
    for (const auto& m : present_maps_) {
      for (const KeySpec* c : ref_.children(m.first)) {
        const std::string d = join(m.second, c->leaf());
        if (values_.has(d) || !c->default_text) continue;
        ScenarioValue v;
        v.type = c->type;
        v.where = "default";
        const std::string& s = *c->default_text;
        if (c->type == KeyType::quantity) {
          std::string why;
          units.to_si(s, c->dimension, v.number, why);
        } else if (c->type == KeyType::integer) {
          v.integer = std::stoll(s);
          v.number = static_cast<double>(v.integer);
        } else if (c->type == KeyType::boolean) {
          v.boolean = s == "true";
        } else {
          v.text = s;
        }
        values_.set(d, v);
      }
    }
    for (const auto& m : present_maps_) {
      if (implicit_maps_.count(m.second)) continue;  // nothing is required of an absent block
      for (const KeySpec* c : ref_.children(m.first)) {
        const std::string d = join(m.second, c->leaf());
        if (values_.has(d)) continue;
        bool needed = c->required;
        if (!c->required_when_key.empty()) {
          // The condition key is relative to the root, or to the same list item.
          std::string cond = c->required_when_key;
          const auto lb = m.second.rfind(']');
          if (cond.find("[]") != std::string::npos && lb != std::string::npos)
            cond = m.second.substr(0, lb + 1) + cond.substr(cond.find("[]") + 2);
          needed = values_.has(cond) && values_.at(cond).text == c->required_when_value;
        }
        if (needed) {
          std::string msg = "missing";
          if (!c->required_when_key.empty()) msg += " (required when " + c->required_when_key + " is " + c->required_when_value + ")";
          if (!c->dimension.empty() && c->dimension != "dimensionless") msg += "; unit " + units.si_unit(c->dimension);
          msg += ": " + c->meaning;
          problem(values_.where(m.second), d, msg);
        }
      }
    }
  }

  const KeyReference& ref_;
  std::vector<Problem>& problems_;
  ScenarioValues values_;
  const std::map<std::string, std::string>* origin_ = nullptr;
  std::string file_, table_file_;
  bool in_table_ = false;
  std::vector<std::pair<std::string, std::string>> present_maps_;  // (pattern, display)
  std::set<std::string> implicit_maps_;  // absent optional maps standing for their defaults

 public:
  std::map<std::string, YAML::Node> resolved_;  // display path of a named entry -> its table node
};

/// No key of the reference is nested deeper than a few levels; a --set path longer than this
/// is refused before anything is built from it (a path of 60,000 parts once exhausted the
/// stack in the YAML library's recursive node handling).
constexpr std::size_t kMaxPathSteps = 32;
/// Longest --set argument accepted [characters].
constexpr std::size_t kMaxSetLength = 4096;
/// List indices up to this many digits (no list holds 10^9 items; longer ones overflow).
constexpr std::size_t kMaxIndexDigits = 9;

/// Sets `value` at `path` in `root`: dotted keys, each optionally followed by list indices
/// ("climbers[0].mass", "environment.gusts[1].onset"), creating maps as needed but never
/// list items. Returns "" or why it could not. `created` receives the paths of the maps and
/// keys it added (for locating problems in them on the command line).
std::string set_path(YAML::Node root, const std::string& path, const YAML::Node& value,
                     std::vector<std::string>* created) {
  struct Step {
    std::string key;          // a map key, or "" for a list index
    std::size_t index = 0;
  };
  if (path.empty() || path.front() == '.' || path.back() == '.' ||
      path.find("..") != std::string::npos)
    return "empty key in the path";
  std::vector<Step> steps;
  std::size_t begin = 0;
  while (begin <= path.size()) {
    std::size_t end = path.find('.', begin);
    if (end == std::string::npos) end = path.size();
    const std::string part = path.substr(begin, end - begin);
    begin = end + 1;
    const std::size_t open = part.find('[');
    const std::string key = part.substr(0, open);
    if (key.empty()) return "empty key in the path";
    steps.push_back({key, 0});
    for (std::size_t at = open; at != std::string::npos; at = part.find('[', at)) {
      const std::size_t close = part.find(']', at);
      const std::string digits = close == std::string::npos ? "" : part.substr(at + 1, close - at - 1);
      if (digits.empty() || digits.find_first_not_of("0123456789") != std::string::npos)
        return "a list index is written [0], [1], ... after the key";
      if (digits.size() > kMaxIndexDigits)
        return "list index " + digits.substr(0, 12) + (digits.size() > 12 ? "..." : "") +
               " is too large (no list has that many items)";
      steps.push_back({"", static_cast<std::size_t>(std::stoul(digits))});
      at = close + 1;
      if (at < part.size() && part[at] != '[') return "unexpected text after ']'";
    }
    if (steps.size() > kMaxPathSteps)
      return "a key path has at most " + std::to_string(kMaxPathSteps) +
             " parts (keys and list indices); no scenario key is nested that deep";
  }
  YAML::Node cur = root;
  std::string walked;
  for (std::size_t i = 0; i < steps.size(); ++i) {
    const Step& st = steps[i];
    const bool last = i + 1 == steps.size();
    if (st.key.empty()) {
      if (!cur.IsSequence())
        return walked + " is not a list";
      if (st.index >= cur.size())
        return walked + " has " + std::to_string(cur.size()) + " items; there is no [" + std::to_string(st.index) + "]";
      walked += "[" + std::to_string(st.index) + "]";
      if (last) {
        cur[st.index] = value;
        return "";
      }
      cur.reset(cur[st.index]);
      continue;
    }
    if (cur.IsDefined() && !cur.IsNull() && !cur.IsMap())
      // A named table entry (material: steel) becomes an inline map only by giving all keys;
      // refuse rather than guess.
      return "cannot set below a value that is not a mapping (a named planet or material must be given "
             "inline to change one property)";
    walked += (walked.empty() ? "" : ".") + st.key;
    if (!cur[st.key]) created->push_back(walked);
    if (last) {
      cur[st.key] = value;
      return "";
    }
    cur.reset(cur[st.key]);
  }
  return "";
}

}  // namespace

ScenarioReader::ScenarioReader(std::string file, std::vector<std::string> overrides)
    : file_(std::move(file)), overrides_(std::move(overrides)) {}

ReadScenario ScenarioReader::read(std::vector<Problem>& problems) const {
  std::ifstream in(file_);
  if (!in) {
    problems.push_back({file_, "(file)", "cannot open the scenario file"});
    return {};
  }
  std::stringstream ss;
  ss << in.rdbuf();
  return read_text(ss.str(), problems);
}

ReadScenario ScenarioReader::read_text(const std::string& text, std::vector<Problem>& problems) const {
  ReadScenario out;
  YAML::Node root;
  try {
    const std::vector<YAML::Node> documents = YAML::LoadAll(text);
    if (documents.size() > 1) {
      problems.push_back({location(file_, documents[1].Mark()), "(syntax)",
                          "a scenario is one YAML document; this file holds " +
                              std::to_string(documents.size()) + " (separated by ---)"});
      return out;
    }
    if (!documents.empty()) root = documents.front();
  } catch (const YAML::ParserException& e) {
    problems.push_back({location(file_, e.mark), "(syntax)", "malformed YAML: " + e.msg});
    return out;
  }
  if (!root.IsMap()) {
    problems.push_back({file_, "(top level)", "a scenario is a mapping of keys (key: value); the file holds none"});
    return out;
  }
  std::map<std::string, std::string> origin;
  for (const auto& o : overrides_) {
    if (o.size() > kMaxSetLength) {
      problems.push_back({"--set " + o.substr(0, 40) + "...", "(command line)",
                          "longer than " + std::to_string(kMaxSetLength) +
                              " characters; no key path and value need that much"});
      continue;
    }
    const auto eq = o.find('=');
    if (eq == std::string::npos || eq == 0) {
      problems.push_back({"--set " + o, "(command line)", "expected --set key.path=value"});
      continue;
    }
    const std::string path = o.substr(0, eq), value = o.substr(eq + 1);
    YAML::Node v;
    try {
      v = YAML::Load(value);
    } catch (const YAML::ParserException& e) {
      problems.push_back({"--set " + o, path, "malformed value: " + e.msg});
      continue;
    }
    // Changing one property of a named planet or material: write the entry out inline first.
    const std::string head = path.substr(0, path.find('.'));
    const KeySpec* head_spec = KeyReference::builtin().find(head);
    if (head != path && head_spec && head_spec->type == KeyType::name_or_map && root[head] && root[head].IsScalar()) {
      const YAML::Node table = YAML::Load(embedded_config().at(head_spec->table));
      const YAML::Node entry = table.begin()->second[root[head].Scalar()];
      if (entry) {
        YAML::Node inline_entry = YAML::Clone(entry);
        inline_entry["name"] = root[head].Scalar();
        root[head] = inline_entry;
      }
    }
    std::vector<std::string> created;
    if (const std::string why = set_path(root, path, v, &created); !why.empty()) {
      problems.push_back({"--set " + o, path, why});
      continue;
    }
    origin[path] = o;
    // Keys the --set added above its own path are located on the command line too.
    for (const std::string& c : created) origin.emplace(c, o);
  }
  Validator val(KeyReference::builtin(), problems);
  val.validate_root(root, file_, origin);
  out.values = val.values();
  // The scenario as run: after --set, with named planet/material entries written in full.
  YAML::Node as_run = YAML::Clone(root);
  for (const auto& r : val.resolved_) {
    YAML::Node entry = YAML::Clone(r.second);
    entry["name"] = out.values.text(r.first);
    as_run[r.first] = entry;
  }
  YAML::Emitter em;
  em << as_run;
  out.text_as_run = std::string("# scenario as run by hawser (from ") + file_ + ")\n" + em.c_str() + "\n";
  return out;
}

std::string format_problems(const std::vector<Problem>& problems) {
  std::string s;
  for (const auto& p : problems) s += "error: " + p.str() + "\n";
  return s;
}

}  // namespace hawser
