"""Checks the checker: pages broken on purpose must fail for the right reason, a sound one must pass.

Without this, a browser test whose console capture or blank detection had quietly stopped
working would pass every report.
"""

import pathlib

import png_pixels
from page_check import Expect, check_page

_SOUND = """<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>checker self-test</title>
<style>{css}</style></head>
<body>
<div class="caution">Planning estimates only: a sample caution.</div>
<svg class="chart" width="600" height="400" xmlns="http://www.w3.org/2000/svg">
  <rect class="bar" x="20" y="20" width="560" height="360" fill="#1b3b6f"/>
  <rect class="bar" x="60" y="60" width="200" height="100" fill="#e0a020"/>
</svg>
<p>Some text on the page.</p>
{extra}
</body></html>
"""

_EXPECT = Expect(selectors=["div.caution", "svg.chart", "svg.chart .bar"],
                 texts=[("div.caution", "Planning estimates only")], min_colours=3, min_ink_share=0.02)

# name -> (what is broken in the page: css, extra markup or a text replaced; the failure kind the checker must report; None: must pass)
_CASES = {
    "sound": ({}, None),
    "console_error": ({"extra": '<script>console.error("deliberate error");</script>'}, "console"),
    "console_assert": ({"extra": "<script>console.assert(1 === 2, 'deliberate');</script>"}, "console"),
    "exception": ({"extra": "<script>null.deliberate();</script>"}, "exception"),
    "missing_resource": ({"extra": '<img src="no-such-picture.png" alt="">'}, "console"),
    "missing_chart": ({"replace": ('<svg class="chart"', '<svg class="other"')}, "element"),
    "hidden_chart": ({"css": "svg.chart { display: none; }"}, "element"),
    "wrong_caution": ({"replace": ("Planning estimates only", "Estimates")}, "text"),
    "blank": ({"css": "* { color: #fff !important; fill: #fff !important; background: #fff !important; }"},
              "blank"),
}


def _page(broken):
    html = _SOUND.format(css=broken.get("css", ""), extra=broken.get("extra", ""))
    old, new = broken.get("replace", ("", ""))
    return html.replace(old, new) if old else html


def _png_round_trip():
    """The decoder against our encoder with every PNG filter type (ISO/IEC 15948, section 9)."""
    w, h = 7, 10
    rows = [bytes((x * 37 + y * 11 + c * 101) % 256 for x in range(w) for c in range(3)) for y in range(h)]
    for filters in ([0], [1], [2], [3], [4], [0, 1, 2, 3, 4]):
        image = png_pixels.decode(png_pixels.encode_rgb(w, h, rows, filters))
        if image.rows != rows:
            return f"PNG decoding differs after filters {filters}"
    white = [b"\xff" * (3 * w)] * h
    ink = png_pixels.Ink(png_pixels.decode(png_pixels.encode_rgb(w, h, white, [0])))
    if ink.distinct_colours != 1 or ink.ink_share != 0.0:
        return "a white image is not counted as blank"
    return None


def run(chromium, scratch):
    scratch = pathlib.Path(scratch)
    scratch.mkdir(parents=True, exist_ok=True)
    wrong = []
    problem = _png_round_trip()
    print(("FAIL png decoder: " + problem) if problem else "ok   png decoder: all five filter types")
    if problem:
        wrong.append("png")
    for name, (broken, must_fail_as) in _CASES.items():
        page = scratch / f"{name}.html"
        page.write_text(_page(broken), encoding="utf-8")
        failures = check_page(chromium, page, _EXPECT, scratch, window=(800, 600)).failures
        kinds = sorted({f.kind for f in failures})
        seen = "; ".join(f"[{f.kind}] {f.message}" for f in failures) or "passed"
        if must_fail_as is None:
            good = not failures
            want = "must pass"
        else:
            good = must_fail_as in kinds and "browser" not in kinds
            want = f"must fail as {must_fail_as}"
        print(f"{'ok  ' if good else 'FAIL'} {name} ({want}): {seen}")
        if not good:
            wrong.append(name)
    print(f"checker self-test: {len(_CASES) + 1 - len(wrong)} of {len(_CASES) + 1} cases as expected")
    return 1 if wrong else 0
