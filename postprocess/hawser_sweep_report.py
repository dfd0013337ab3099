#!/usr/bin/python3
"""hawser_sweep_report.py SWEEP_DIR [-o OUTDIR] [--no-variant-reports]: compares the variants of
a sweep (`hawser sweep`) in one HTML page.

Reads the sweep folder alone: study.json (the variants and their overrides, the ranking metrics
and limits), summary.csv (one row per variant) and ranking.md (the program's own ranking). Writes
OUTDIR/index.html with the ranking table and figures, each ranking or limit metric (and the peak
offsets, the smallest safety factor and any settling time recorded) against each varied key, one
line per combination of the other keys, the limits dashed; and, unless --no-variant-reports,
each variant's own report (hawser_report.py) in OUTDIR/variants/<id>/, linked from the table.
OUTDIR defaults to SWEEP_DIR/report. Exit codes: 0 written; 2 not a sweep folder.
"""

import argparse
import base64
import csv
import html
import json
import re
import sys
from pathlib import Path

import matplotlib

matplotlib.use("Agg")  # no display; must precede pyplot

import matplotlib.pyplot as plt  # noqa: E402

sys.dont_write_bytecode = True
sys.path.insert(0, str(Path(__file__).resolve().parent))
import hawser_report  # noqa: E402
from hawser_result import layout_value  # noqa: E402

# Always compared when recorded; units from the name's ending.
STANDARD_METRICS = ["min_safety_factor", "peak_east_west_m", "peak_north_south_m", "peak_tension_n"]
NUMBER = re.compile(r"^\s*([-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?)\s*(.*)$")


def numeric(text):
    """(number, unit) of an override value such as "150 km/h", or None."""
    m = NUMBER.match(text or "")
    return (float(m.group(1)), m.group(4).strip()) if m else None


def metrics_of(study, columns):
    wanted = [r["metric"] for r in study.get("rank_by", [])]
    wanted += [lim["metric"] for lim in study.get("limits", [])]
    wanted += STANDARD_METRICS + [c for c in columns if "settling" in c]
    out = []
    for m in wanted:
        if m in columns and m not in out:
            out.append(m)
    return out


def plot_metric(rows, study, key, metric, path):
    """`metric` against `key`, one line per combination of the other varied keys."""
    others = [k for k in study["varied_keys"] if k != key]
    values = [r[key] for r in rows]
    nums = [numeric(v) for v in values]
    as_numbers = all(n is not None for n in nums) and len({n[1] for n in nums}) == 1
    order = sorted(set(values), key=lambda v: numeric(v)[0] if as_numbers else v)
    fig, ax = plt.subplots(figsize=(6.4, 4.0))
    groups = {}
    for r in rows:
        groups.setdefault(tuple(r[k] for k in others), []).append(r)
    for label, members in sorted(groups.items()):
        members = [m for m in members if m[key] != "" and m.get(metric, "") != ""]
        members.sort(key=lambda m: order.index(m[key]))
        xs = [numeric(m[key])[0] if as_numbers else order.index(m[key]) for m in members]
        ys = [float(m[metric]) for m in members]
        name = ", ".join(f"{k} = {v}" for k, v in zip(others, label) if v != "") or "variants"
        ax.plot(xs, ys, "o-", label=name)
    for lim in study.get("limits", []):
        if lim["metric"] == metric:
            bound = lim.get("at_least", lim.get("at_most"))
            ax.axhline(bound, ls="--", color="crimson", label=f"limit {lim['text']}")
    if not as_numbers:
        ax.set_xticks(range(len(order)))
        ax.set_xticklabels(order, rotation=20)
    ax.set_xlabel(key + (f" [{nums[0][1]}]" if as_numbers and nums[0][1] else ""))
    entry = layout_value("/summary", metric) or {}  # the contract's unit, not the name's
    unit = "" if entry.get("units") in (None, "1", "text") else entry["units"]
    ax.set_ylabel(metric + (f" [{unit}]" if unit else ""))
    ax.grid(True, alpha=0.3)
    ax.legend(fontsize=7)
    fig.tight_layout()
    fig.savefig(path, dpi=100)
    plt.close(fig)


def ranking_rows(md_text):
    """The table of ranking.md as lists of cells (header first)."""
    rows = []
    for line in md_text.splitlines():
        if line.startswith("|") and not line.startswith("|---"):
            cells = re.split(r"(?<!\\)\|", line.strip())[1:-1]
            rows.append([c.strip().replace("\\|", "|") for c in cells])
    return rows


def build_html(study, table, links, figures):
    head, body = table[0], table[1:]
    vcol = head.index("variant")
    title = html.escape(study["study"])
    out = [f"<!DOCTYPE html><html><head><meta charset='utf-8'><title>Sweep {title}</title>",
           "<style>body{font-family:sans-serif;margin:2em}table{border-collapse:collapse}"
           "td,th{border:1px solid #ccc;padding:3px 6px;font-size:90%}"
           ".breaks{background:#fde}</style>",
           f"</head><body><h1>Sweep: {html.escape(study['study'])}</h1>",
           f"<p>{len(body)} variants of <code>{html.escape(study['scenario'])}</code>. "
           f"{html.escape(hawser_report.CAUTION)}</p><h2>Ranking</h2><table><tr>"]
    out += [f"<th>{html.escape(h)}</th>" for h in head] + ["</tr>"]
    for row in body:
        cls = " class='breaks'" if "BREAKS" in row[-1] else ""
        cells = []
        for i, c in enumerate(row):
            text = html.escape(c.replace("**", ""))
            if i == vcol and c in links:
                text = f"<a href='{html.escape(links[c])}'>{text}</a>"
            cells.append(f"<td>{text}</td>")
        out.append(f"<tr{cls}>" + "".join(cells) + "</tr>")
    out.append("</table><h2>Comparisons</h2>")
    for title, png in figures:
        data = base64.b64encode(png.read_bytes()).decode()
        t = html.escape(title)
        out.append(f"<h3>{t}</h3><img alt='{t}' src='data:image/png;base64,{data}'>")
    out.append("</body></html>")
    return "\n".join(out)


def main(argv=None):
    ap = argparse.ArgumentParser(
        description="Compare the variants of a hawser sweep in one HTML page.")
    ap.add_argument("sweep", help="the sweep folder (hawser sweep -o DIR)")
    ap.add_argument("-o", "--outdir", help="output folder (default: SWEEP/report)")
    ap.add_argument("--no-variant-reports", action="store_true",
                    help="do not make each variant's own report")
    args = ap.parse_args(argv)
    sweep = Path(args.sweep)
    try:
        study = json.loads((sweep / "study.json").read_text())
        with open(sweep / "summary.csv", newline="") as f:
            rows = list(csv.DictReader(f))
        table = ranking_rows((sweep / "ranking.md").read_text())
    except (OSError, ValueError) as exc:
        print(f"hawser_sweep_report: error: {sweep} is not a finished sweep folder ({exc})",
              file=sys.stderr)
        return 2
    outdir = Path(args.outdir) if args.outdir else sweep / "report"
    outdir.mkdir(parents=True, exist_ok=True)
    links = {}
    if not args.no_variant_reports:
        for r in rows:
            h5 = sweep / (r["id"] + ".h5")
            if r["status"] in ("complete", "stopped", "failed") and h5.exists():
                target = outdir / "variants" / r["id"]
                if hawser_report.main([str(h5), "-o", str(target)]) == 0:
                    links[r["id"]] = f"variants/{r['id']}/report.html"
    done = [r for r in rows if r["status"] in ("complete", "stopped", "failed")]
    figures = []
    for metric in metrics_of(study, rows[0].keys() if rows else []):
        for key in study["varied_keys"]:
            if len({r[key] for r in done if r[key]}) < 2:
                continue  # a key only one variant sets compares nothing
            png = outdir / f"{metric}__{re.sub(r'[^A-Za-z0-9_]+', '_', key)}.png"
            plot_metric(done, study, key, metric, png)
            figures.append((f"{metric} against {key}", png))
    (outdir / "index.html").write_text(build_html(study, table, links, figures), encoding="utf-8")
    print(f"hawser_sweep_report: wrote {outdir / 'index.html'} ({len(figures)} figures, "
          f"{len(links)} variant reports)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
