#!/usr/bin/env python3
"""Browser test of knockon's HTML reports: opens each in headless Chromium and checks it.

    check_reports.py --knockon build/knockon [--page FILE.html PRESET|SELECTOR... ...]
                     [--scratch DIR] [--window-size W,H] [--screenshot-out PNG]
                     [--network-screenshot-out PNG]
    check_reports.py --self-test [--scratch DIR]

With --knockon it builds the demo's plan report (knockon report scenarios/demo.yaml -o
SCRATCH/plan.html), the bundled single line's plan report (scenarios/single_line.yaml) and a
small demo study's report (simulate --replications 20 --traces sample:4
--out SCRATCH/study.h5, then report SCRATCH/study.h5) and the same study's report of the network
demo (scenarios/junction_branch.yaml), and checks them against the "plan", "single", "study" and
"network" presets below; each --page adds a file of your own, checked against a preset name or a
list of CSS selectors. --screenshot-out keeps the demo study report's screenshot (the README's
picture), --network-screenshot-out the network study report's. --self-test feeds the checker deliberately broken
pages and fails unless it catches every one.

Exit status: 0 passed, 1 failed (Chromium missing included), 77 skipped because
KNOCKON_NO_BROWSER=1 was set. Each Chromium run is limited to 60 s.
"""

import argparse
import os
import pathlib
import shutil
import subprocess
import sys
import tempfile

import self_test
from page_check import Expect, check_page

ROOT = pathlib.Path(__file__).resolve().parents[2]
SKIPPED = 77

# What each kind of report must show, by the classes and ids tools/report/html_report.cpp,
# tools/report/plan_charts.cpp, tools/report/results_report.cpp and tools/report/result_charts.cpp write.
# Every report carries the safety caution at the top and at the foot, and is no blank page.
EVERY_REPORT = dict(
    texts=[
        ("div.caution", "Planning estimates only"),
        ("div.caution", "licensed signalling engineers"),
        ("footer", "Planning estimates only"),
    ],
    min_colours=16,
    min_ink_share=0.03,
)

PRESETS = {
    "plan": Expect(
        selectors=[
            "div.caution",
            "section#verdict table",
            "section#time-distance svg.knockon-chart.time-distance",
            "svg.knockon-chart.time-distance .train-path",
            "svg.knockon-chart.time-distance .block",
            "svg.knockon-chart.time-distance .station-line",
            "svg.knockon-chart.time-distance .signal-tick",
            "section#capacity svg.knockon-chart.capacity",
            "svg.knockon-chart.capacity .cap-bar",
            "svg.knockon-chart.capacity .cap-limit",
            "section#capacity svg.knockon-chart.hourly-capacity .hour-bar",
            "section#buffers table",
            "section#running-times table",
            "section#headway-matrix table",
            "section#run-facts table.facts",
            "footer",
        ],
        **EVERY_REPORT,
    ),
    # knockon report of the bundled single line: the plan's sections plus the crossings per
    # crossing place, the single-track capacity table and the loops drawn in the diagram.
    "single": Expect(
        selectors=[
            "div.caution",
            "section#time-distance svg.knockon-chart.time-distance",
            "svg.knockon-chart.time-distance .train-path",
            "svg.knockon-chart.time-distance .loop-band",
            "svg.knockon-chart.time-distance .loop-path",
            "section#verdict table",
            "section#capacity svg.knockon-chart.capacity .cap-bar",
            "section#capacity svg.knockon-chart.hourly-capacity .hour-bar",
            "section#buffers table",
            "section#crossings table",
            "footer",
        ],
        **EVERY_REPORT,
    ),
    # knockon report STUDY.h5: the plan's sections plus the results of the study, with the as-run
    # paths of a traced day over the planned ones.
    "study": Expect(
        selectors=[
            "div.caution",
            "section#verdict table",
            "section#verdict #top-sources",
            "section#verdict #top-buffers",
            # The demo's attribution fills both lists (three rows each) and the ranking across days.
            "section#verdict #top-sources table tbody tr:nth-child(3) td",
            "section#verdict #top-buffers table tbody tr:nth-child(3) td",
            "section#knock-on-sources table",
            "section#time-distance svg.knockon-chart.time-distance",
            "svg.knockon-chart.time-distance .train-path",
            "svg.knockon-chart.time-distance .asrun-path",
            # The traced day's largest delay trees, drawn as arrows over the as-run paths.
            "svg.knockon-chart.time-distance .delay-trees line.tree-arrow",
            "svg.knockon-chart.time-distance .block",
            "section#delays svg.knockon-chart",
            "section#delays svg.knockon-chart .bar",
            "section#delays svg.knockon-chart .ci-whisker",
            "section#delay-growth svg.knockon-chart.hbars .hbar",
            "section#capacity svg.knockon-chart.capacity .cap-bar",
            "section#capacity svg.knockon-chart.hourly-capacity .hour-bar",
            "section#buffers table",
            "section#running-times table",
            "section#run-facts table.facts",
            "footer",
        ],
        **EVERY_REPORT,
    ),
    # knockon report of a network study: one time-distance diagram per corridor, the day as run
    # over the plan, the branch's crossing places as bands.
    "network": Expect(
        selectors=[
            "div.caution",
            "section#verdict table",
            "section#time-distance svg.knockon-chart.time-distance",
            "svg.knockon-chart.time-distance .train-path",
            "svg.knockon-chart.time-distance .asrun-path",
            "svg.knockon-chart.time-distance .station-line",
            "svg.knockon-chart.time-distance .loop-band",
            "section#delays svg.knockon-chart .bar",
            "section#crossings table",
            "footer",
        ],
        texts=EVERY_REPORT["texts"] + [
            ("section#time-distance", "corridor Main (WRF-OLV-EMR)"),
            ("section#time-distance", "corridor Branch (OLV-PLC-HTB-QSB)"),
        ],
        min_colours=EVERY_REPORT["min_colours"],
        min_ink_share=EVERY_REPORT["min_ink_share"],
    ),
}


def run(command):
    # From the source tree, so the report's "file" and "command" rows read scenarios/demo.yaml.
    result = subprocess.run(command, capture_output=True, text=True, timeout=300, cwd=ROOT)
    if result.returncode != 0:
        sys.exit(f"FAIL: {' '.join(command)} exited with {result.returncode}:\n{result.stderr}")


def shown(path):
    """`path` as the report's command row will show it: relative to the source tree when inside it."""
    path = path.resolve()
    return str(path.relative_to(ROOT)) if path.is_relative_to(ROOT) else str(path)


def demo_reports(knockon, scratch):
    """The reports built from the demo and checked by default: (file, preset name)."""
    plan = scratch / "plan.html"
    run([knockon, "report", "scenarios/demo.yaml", "-o", shown(plan)])
    yield plan, "plan"
    # The bundled single line in an hour with a crossing in a loop.
    single = scratch / "single_line.html"
    run([knockon, "report", "scenarios/single_line.yaml", "--from", "06:00", "--to", "07:00", "-o", shown(single)])
    yield single, "single"
    # The README's study: a small one here (20 days, 4 traced), the same commands.
    h5, study = scratch / "study.h5", scratch / "study.html"
    run([knockon, "simulate", "scenarios/demo.yaml", "--replications", "20", "--traces", "sample:4",
         "--out", shown(h5)])
    run([knockon, "report", shown(h5), "-o", shown(study)])
    yield study, "study"
    # The same study of the network demo.
    h5, network = scratch / "network.h5", scratch / "network.html"
    run([knockon, "simulate", "scenarios/junction_branch.yaml", "--replications", "20", "--traces", "sample:4",
         "--out", shown(h5)])
    run([knockon, "report", shown(h5), "-o", shown(network)])
    yield network, "network"


def expectation(spec):
    """A preset name, or CSS selectors that must each match a drawn element."""
    if len(spec) == 1 and spec[0] in PRESETS:
        return PRESETS[spec[0]]
    unknown = [s for s in spec if s in PRESETS]
    if unknown or not spec:
        sys.exit(f"--page: give one preset ({', '.join(PRESETS)}) or CSS selectors, not {spec}")
    return Expect(selectors=list(spec))


def find_chromium(given):
    chromium = given or os.environ.get("CHROMIUM") or shutil.which("chromium")
    if chromium and shutil.which(chromium):
        return chromium
    print("FAIL: chromium not found. Install Debian's chromium (tools/run_tests.sh does), or set "
          "KNOCKON_NO_BROWSER=1 to skip the browser test on purpose.", file=sys.stderr)
    sys.exit(1)


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--knockon", help="the knockon executable; builds and checks the demo's reports")
    parser.add_argument("--page", nargs="+", action="append", default=[], metavar="ARG",
                        help="FILE.html then a preset name or CSS selectors; repeatable")
    parser.add_argument("--scratch", help="working directory (emptied first; default: a temporary one)")
    parser.add_argument("--window-size", default="1400,2000", help="browser window W,H in px")
    parser.add_argument("--screenshot-out", help="keep the demo study report's screenshot here (PNG)")
    parser.add_argument("--network-screenshot-out", help="keep the network study report's screenshot here (PNG)")
    parser.add_argument("--chromium", help="browser executable (default: $CHROMIUM or chromium)")
    parser.add_argument("--self-test", action="store_true", help="check the checker with broken pages")
    args = parser.parse_args()

    if os.environ.get("KNOCKON_NO_BROWSER") == "1":
        print("SKIPPED: KNOCKON_NO_BROWSER=1 is set; the reports were not opened in a browser.")
        return SKIPPED
    chromium = find_chromium(args.chromium)
    window = tuple(int(v) for v in args.window_size.split(","))

    if args.scratch:
        scratch = pathlib.Path(args.scratch)
        shutil.rmtree(scratch, ignore_errors=True)
        scratch.mkdir(parents=True)
    else:
        scratch = pathlib.Path(tempfile.mkdtemp(prefix="knockon_browser_"))

    if args.self_test:
        status = self_test.run(chromium, scratch / "self_test")
    else:
        pages = [(pathlib.Path(spec[0]), expectation(spec[1:])) for spec in args.page]
        keep = {}   # page index -> where to keep its screenshot
        if args.knockon:
            knockon = str(pathlib.Path(args.knockon).resolve())
            built = list(demo_reports(knockon, scratch))
            presets = [p for _, p in built]
            for preset, out in (("study", args.screenshot_out), ("network", args.network_screenshot_out)):
                if out:
                    keep[presets.index(preset)] = out
            pages = [(f, PRESETS[p]) for f, p in built] + pages
        if not pages:
            parser.error("nothing to check: give --knockon, --page or --self-test")
        status = check_pages(chromium, pages, scratch, window, keep)
    if status:
        print(f"pages, DOM dumps and screenshots are in {scratch}")
    elif not args.scratch:
        shutil.rmtree(scratch, ignore_errors=True)
    return status


def check_pages(chromium, pages, scratch, window, keep=None):
    """Checks each (file, Expect); keeps page i's screenshot as keep[i] (a PNG path) if it passed."""
    keep = keep or {}
    failed = 0
    names = [html.stem for html, _ in pages]
    for i, (html, expect) in enumerate(pages):
        name = html.stem if names.count(html.stem) == 1 else f"{html.stem}-{i}"
        result = check_page(chromium, html, expect, scratch, window, name=name)
        if result.failures:
            failed += 1
            print(f"FAIL {html}:")
            for f in result.failures:
                print(f"  [{f.kind}] {f.message}")
            continue
        print(f"ok   {html}: {result.summary}")
        if i in keep:
            tmp = pathlib.Path(keep[i] + ".tmp")
            shutil.copyfile(result.screenshot, tmp)
            os.replace(tmp, keep[i])   # whole or absent
            print(f"     screenshot kept as {keep[i]}")
    print(f"{len(pages) - failed} of {len(pages)} report pages passed the browser check")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
