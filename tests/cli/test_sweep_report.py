#!/usr/bin/python3
"""postprocess/hawser_sweep_report.py on a real sweep folder (four variants of the traffic
scenario, 2 simulated hours): the page holds the program's ranking table (every variant, in
ranking.md's order), the comparison figures (each ranking or limit metric, and the standard
ones, against each of the two varied keys; PNG embedded and beside the page), and a link per
variant to its own report (hawser_report.py), which exists. A folder that is not a sweep gives
exit code 2. Expectations: the issue's brief and the script's own docstring.

Run by ctest as: python3 test_sweep_report.py --hawser BIN --source DIR
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile

from cli_checks import Checks, command_line
from sweep_cases import write_study


def main():
    args = command_line()
    c = Checks()
    script = os.path.join(args.source, "postprocess", "hawser_sweep_report.py")
    tmp = tempfile.mkdtemp(prefix="hawser-sweep-report-")
    try:
        study = write_study(tmp, args.source)
        out = os.path.join(tmp, "out")
        subprocess.run([args.hawser, "sweep", study, "-j", "2", "-o", out], capture_output=True,
                       check=True)
        r = subprocess.run(["/usr/bin/python3", script, out], capture_output=True, text=True)
        c.check(r.returncode == 0, "the report is written", r.stderr[-500:])
        page = open(os.path.join(out, "report", "index.html")).read()
        md = open(os.path.join(out, "ranking.md")).read()
        ids_md = re.findall(r"^\| \d+ \| (\S+) \|", md, re.M)
        ids_page = re.findall(r"<td><a href='variants/([^/]+)/report.html'>", page)
        c.check(len(ids_md) == 4 and ids_page == ids_md,
                "the ranking table lists every variant in ranking.md's order",
                (ids_md, ids_page))
        for i in ids_page:
            c.check(os.path.exists(os.path.join(out, "report", "variants", i, "report.html")),
                    f"{i}: its own report exists")
        # min_safety_factor and peak_east_west_m (ranking, limit), peak_north_south_m and
        # peak_tension_n (standard), each against the two varied keys.
        imgs = page.count("<img ")
        pngs = [f for f in os.listdir(os.path.join(out, "report")) if f.endswith(".png")]
        c.check(imgs == 8 and len(pngs) == 8, "eight comparison figures, embedded and as PNG files",
                (imgs, pngs))
        c.check("peak_east_west_m against schedules[0].cruise_speed" in page,
                "figures are titled metric against key")
        c.check("class='breaks'" in page, "variants that break a limit are marked in the table")
        r = subprocess.run(["/usr/bin/python3", script, tmp + "/nothing"], capture_output=True,
                           text=True)
        c.check(r.returncode == 2 and "not a finished sweep folder" in r.stderr,
                "not a sweep folder: exit 2",
                r.stderr)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return c.summary()


if __name__ == "__main__":
    sys.exit(main())
