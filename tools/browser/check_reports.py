#!/usr/bin/env python3
"""Browser test of knockon's HTML reports: opens each in headless Chromium and checks it.

    check_reports.py --knockon build/knockon [--page FILE.html PRESET|SELECTOR... ...]
                     [--scratch DIR] [--window-size W,H] [--screenshot-out PNG]
    check_reports.py --self-test [--scratch DIR]

Without --page it builds the demo's plan report (knockon report scenarios/demo.yaml -o
SCRATCH/plan.html) and checks it against the "plan" preset below; each --page adds a file of your
own, checked against a preset name or a list of CSS selectors. --screenshot-out keeps the demo
report's screenshot (the README's picture). --self-test feeds the checker deliberately broken
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

# What each kind of report must show, by the classes and ids tools/io/html_report.cpp and
# tools/io/plan_charts.cpp write.  The study report (knockon report STUDY.h5) gets its own entry
# here when it lands, and a builder in demo_reports() below.
PRESETS = {
    "plan": Expect(
        selectors=[
            "div.caution",
            "section#time-distance svg.knockon-chart.time-distance",
            "svg.knockon-chart.time-distance .train-path",
            "svg.knockon-chart.time-distance .block",
            "svg.knockon-chart.time-distance .station-line",
            "svg.knockon-chart.time-distance .signal-tick",
            "section#capacity svg.knockon-chart.capacity",
            "svg.knockon-chart.capacity .cap-bar",
            "svg.knockon-chart.capacity .cap-limit",
            "section#buffers table",
            "footer",
        ],
        texts=[
            ("div.caution", "Planning estimates only"),
            ("div.caution", "licensed signalling engineers"),
            ("footer", "Planning estimates only"),
        ],
        min_colours=16,
        min_ink_share=0.03,
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
    # Hook for the study report: once `knockon report STUDY.h5` exists, build it here, e.g.
    #   run([knockon, "simulate", demo, "--replications", "20", "--out", str(scratch / "study.h5")])
    #   run([knockon, "report", str(scratch / "study.h5"), "-o", str(scratch / "study.html")])
    #   yield scratch / "study.html", "study"
    # with a "study" entry in PRESETS.


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
    parser.add_argument("--screenshot-out", help="keep the demo plan report's screenshot here (PNG)")
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
        if args.knockon:
            knockon = str(pathlib.Path(args.knockon).resolve())
            pages = [(f, PRESETS[p]) for f, p in demo_reports(knockon, scratch)] + pages
        if not pages:
            parser.error("nothing to check: give --knockon, --page or --self-test")
        keep = args.screenshot_out if args.knockon else None
        status = check_pages(chromium, pages, scratch, window, keep)
    if status:
        print(f"pages, DOM dumps and screenshots are in {scratch}")
    elif not args.scratch:
        shutil.rmtree(scratch, ignore_errors=True)
    return status


def check_pages(chromium, pages, scratch, window, screenshot_out):
    """Checks each (file, Expect); keeps the first page's screenshot as `screenshot_out` if it passed."""
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
        if i == 0 and screenshot_out:
            tmp = pathlib.Path(screenshot_out + ".tmp")
            shutil.copyfile(result.screenshot, tmp)
            os.replace(tmp, screenshot_out)   # whole or absent
            print(f"     screenshot kept as {screenshot_out}")
    print(f"{len(pages) - failed} of {len(pages)} report pages passed the browser check")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
