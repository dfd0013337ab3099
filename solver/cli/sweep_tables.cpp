#include "solver/cli/sweep_tables.hpp"

#include <algorithm>
#include <cstdio>
#include <filesystem>
#include <set>

namespace hawser {

namespace {
std::string number_text(double x) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.6g", x);
  return buf;
}

std::string csv_field(const std::string& s) {
  if (s.find_first_of(",\"\n") == std::string::npos) return s;
  std::string q = "\"";
  for (const char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
  return q + "\"";
}

std::string override_value(const Variant& v, const std::string& key) {
  for (const Override& o : v.overrides)
    if (o.path == key) return o.value;
  return "";
}

std::string md_cell(std::string s) {
  for (std::size_t p = s.find('|'); p != std::string::npos; p = s.find('|', p + 2))
    s.replace(p, 1, "\\|");
  return s;
}
}  // namespace

std::vector<SweepRow> gather_rows(const Study& st, const SweepFolder& folder) {
  std::vector<SweepRow> rows;
  for (const Variant& v : st.variants) {
    SweepRow r;
    r.variant = &v;
    const auto o = folder.outcome(v);
    if (o) {
      r.exit_code = o->exit_code;
      r.wall_s = o->wall_s;
      r.message = o->message;
    }
    if (std::filesystem::exists(folder.result(v))) {
      try {
        r.result = read_result_summary(folder.result(v));
        r.status = r.result.status;
      } catch (const std::exception& e) {
        r.status = "unreadable";
        r.message = e.what();
      }
    } else {
      r.status = o && o->exit_code != 0 ? "no result" : "not run";
    }
    if (r.result.final()) {
      const auto m = r.result.summary.find("message");
      if (m != r.result.summary.end() && !m->second.text.empty()) r.message = m->second.text;
      for (const Limit& l : st.limits) {
        const auto x = r.result.number(l.metric);
        if (!x)
          r.broken.push_back(l.metric + " missing");
        else if (l.at_least ? !(*x >= l.bound) : !(*x <= l.bound))
          r.broken.push_back(l.metric + (l.at_least ? " >= " : " <= ") + l.text + " (" +
                             number_text(*x) + ")");
      }
    }
    rows.push_back(r);
  }
  return rows;
}

std::string summary_csv(const Study& st, const std::vector<SweepRow>& rows) {
  std::set<std::string> metrics;  // every /summary attribute of any variant, in name order
  for (const SweepRow& r : rows)
    for (const auto& kv : r.result.summary)
      if (kv.first != "status" && kv.first != "message") metrics.insert(kv.first);
  std::string out = "index,id,name";
  for (const auto& k : st.varied_keys) out += "," + csv_field(k);
  out += ",status,exit_code,wall_s,limits,message";
  for (const auto& m : metrics) out += "," + m;
  out += "\n";
  for (const SweepRow& r : rows) {
    const Variant& v = *r.variant;
    out += std::to_string(v.index) + "," + v.id + "," + csv_field(v.name);
    for (const auto& k : st.varied_keys) out += "," + csv_field(override_value(v, k));
    std::string limits = r.result.final() ? (r.broken.empty() ? "held" : "broken") : "";
    out += "," + r.status + "," + (r.exit_code ? std::to_string(*r.exit_code) : "") + "," +
           (r.wall_s ? number_text(*r.wall_s) : "") + "," + limits + "," + csv_field(r.message);
    for (const auto& m : metrics) {
      const auto it = r.result.summary.find(m);
      out += "," + (it == r.result.summary.end() ? std::string() : csv_field(it->second.str()));
    }
    out += "\n";
  }
  return out;
}

std::vector<const SweepRow*> ranked(const Study& st, const std::vector<SweepRow>& rows) {
  std::vector<const SweepRow*> order;
  for (const SweepRow& r : rows) order.push_back(&r);
  auto group = [](const SweepRow& r) {
    return r.status != "complete" ? 2 : r.broken.empty() ? 0 : 1;
  };
  std::stable_sort(order.begin(), order.end(), [&](const SweepRow* a, const SweepRow* b) {
    if (group(*a) != group(*b)) return group(*a) < group(*b);
    for (const RankKey& k : st.rank_by) {
      const auto x = a->result.number(k.metric), y = b->result.number(k.metric);
      if (!x || !y) {
        if (x.has_value() != y.has_value()) return x.has_value();  // a missing value ranks last
        continue;
      }
      if (*x != *y) return k.descending ? *x > *y : *x < *y;
    }
    return false;
  });
  return order;
}

std::string ranking_markdown(const Study& st, const std::vector<SweepRow>& rows) {
  std::vector<std::string> metrics;
  for (const RankKey& k : st.rank_by) metrics.push_back(k.metric);
  for (const Limit& l : st.limits)
    if (std::find(metrics.begin(), metrics.end(), l.metric) == metrics.end())
      metrics.push_back(l.metric);
  std::string out = "# Ranking of " + md_cell(st.name) + "\n\n";
  if (!st.rank_by.empty()) {
    out += "Ranked by";
    for (std::size_t i = 0; i < st.rank_by.size(); ++i)
      out += std::string(i ? ", then" : "") + " " + st.rank_by[i].metric +
             (st.rank_by[i].descending ? " (largest first)" : " (smallest first)");
    out += ".";
  }
  if (!st.limits.empty()) {
    out += " Limits:";
    for (std::size_t i = 0; i < st.limits.size(); ++i)
      out += std::string(i ? "," : "") + " " + st.limits[i].metric +
             (st.limits[i].at_least ? " >= " : " <= ") + st.limits[i].text;
    out += "; a variant that breaks one is marked **BREAKS**.";
  }
  // A metric no result records is most likely misspelt: say so rather than rank silently.
  for (const auto& m : metrics) {
    bool seen = false;
    for (const SweepRow& r : rows) seen = seen || r.result.number(m).has_value();
    const bool any_final = std::any_of(rows.begin(), rows.end(),
                                       [](const SweepRow& r) { return r.result.final(); });
    if (!seen && any_final)
      out += "\n\nNote: no result records `" + m +
             "` (see the columns of summary.csv for the metrics there are).";
  }
  out += "\n\n| rank | variant | name |";
  std::string rule = "|---|---|---|";
  for (const auto& k : st.varied_keys) out += " " + md_cell(k) + " |", rule += "---|";
  for (const auto& m : metrics) out += " " + m + " |", rule += "---|";
  out += " status | verdict |\n" + rule + "---|---|\n";
  std::size_t rank = 0;
  for (const SweepRow* r : ranked(st, rows)) {
    out += "| " + std::to_string(++rank) + " | " + r->variant->id + " | " +
           md_cell(r->variant->name) + " |";
    for (const auto& k : st.varied_keys)
      out += " " + md_cell(override_value(*r->variant, k)) + " |";
    for (const auto& m : metrics) {
      const auto x = r->result.number(m);
      out += " " + (x ? number_text(*x) : std::string("")) + " |";
    }
    std::string verdict;
    if (!r->broken.empty()) {
      verdict = "**BREAKS**";
      for (const auto& b : r->broken) verdict += " " + b + ";";
      verdict.pop_back();
    } else if (r->status == "complete") {
      verdict = "holds";
    } else {
      verdict = r->message.empty() ? "-" : r->message;
      if (r->exit_code) verdict = "exit " + std::to_string(*r->exit_code) + ": " + verdict;
    }
    out += " " + r->status + " | " + md_cell(verdict) + " |\n";
  }
  return out;
}

}  // namespace hawser
