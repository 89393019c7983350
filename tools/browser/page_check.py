"""Opens one HTML file in headless Chromium and lists what is wrong with it.

A page passes when the browser logs no error (console errors and failed assertions, uncaught
exceptions, the browser's own error entries such as a resource that failed to load), every
expected element is in the DOM and drawn with a non-zero size, every expected text stands in its
element, and a screenshot of the window is not blank. The DOM as loaded and the screenshot are
saved beside each other for a look after a failure.
"""

import base64
import json
import pathlib
from dataclasses import dataclass, field

import devtools_pipe
import png_pixels


@dataclass
class Expect:
    """What a page must show: CSS selectors that must each match a drawn element, (selector, text)
    pairs whose element must contain the text, and how much of the screenshot must be ink."""
    selectors: list
    texts: list = field(default_factory=list)
    min_colours: int = 8
    min_ink_share: float = 0.01


@dataclass
class Result:
    failures: list     # of Failure; empty: the page passed
    summary: str = ""
    screenshot: pathlib.Path = None


@dataclass
class Failure:
    kind: str       # "load", "console", "exception", "element", "text", "blank", "browser"
    message: str


# Counts, for each selector, the matching elements and those drawn (a box of some extent: a
# horizontal line has height 0; display:none gives 0 x 0).
_COUNT_JS = """(() => {
  const out = {};
  for (const sel of %s) {
    try {
      const all = Array.from(document.querySelectorAll(sel));
      const drawn = all.filter(e => { const r = e.getBoundingClientRect(); return r.width > 0 || r.height > 0; });
      out[sel] = [all.length, drawn.length];
    } catch (e) { out[sel] = [-1, -1]; }
  }
  return JSON.stringify(out);
})()"""

_TEXT_JS = """(() => Array.from(document.querySelectorAll(%s)).map(e => e.textContent).join("\\n"))()"""


def _evaluate(browser, expression):
    result = browser.call("Runtime.evaluate", {"expression": expression, "returnByValue": True})
    if "exceptionDetails" in result:
        raise devtools_pipe.BrowserError("evaluating a check failed: " + str(result["exceptionDetails"].get("text")))
    return result["result"].get("value")


def _logged_problems(events):
    problems = []
    for method, params in events:
        if method == "Runtime.consoleAPICalled" and params.get("type") in ("error", "assert"):
            text = " ".join(str(a.get("value", a.get("description", ""))) for a in params.get("args", []))
            problems.append(Failure("console", f"console.{params['type']}: {text}"))
        elif method == "Runtime.exceptionThrown":
            details = params.get("exceptionDetails", {})
            text = details.get("exception", {}).get("description") or details.get("text", "")
            problems.append(Failure("exception", f"uncaught exception: {text}"))
        elif method == "Log.entryAdded" and params.get("entry", {}).get("level") == "error":
            entry = params["entry"]
            problems.append(Failure("console", f"browser error ({entry.get('source')}): {entry.get('text')} "
                                               f"{entry.get('url', '')}".rstrip()))
    return problems


def check_page(chromium, html, expect, scratch, window=(1400, 2000), name=None, deadline_s=60.0):
    """Checks `html` against `expect`; the profile, DOM and screenshot go to scratch/NAME*."""
    html = pathlib.Path(html).resolve()
    scratch = pathlib.Path(scratch)
    scratch.mkdir(parents=True, exist_ok=True)
    stem = name or html.stem
    failures = []
    try:
        with devtools_pipe.Browser(chromium, str(scratch / ("profile-" + stem)), scratch / (stem + ".chromium.log"),
                                   deadline_s) as browser:
            for domain in ("Page", "Runtime", "Log"):
                browser.call(domain + ".enable")
            browser.call("Emulation.setDeviceMetricsOverride",
                         {"width": window[0], "height": window[1], "deviceScaleFactor": 1, "mobile": False})
            nav = browser.call("Page.navigate", {"url": html.as_uri()})
            if nav.get("errorText"):
                return Result([Failure("load", f"{html}: {nav['errorText']}")])
            browser.wait_for("Page.loadEventFired")
            browser.settle(0.5)   # messages logged just after the load event

            counts = json.loads(_evaluate(browser, _COUNT_JS % json.dumps(expect.selectors)))
            for sel in expect.selectors:
                found, drawn = counts[sel]
                if found < 0:
                    failures.append(Failure("element", f"not a valid CSS selector: {sel}"))
                elif found == 0:
                    failures.append(Failure("element", f"no element matches {sel}"))
                elif drawn == 0:
                    failures.append(Failure("element", f"{found} element(s) match {sel} but none is drawn"))
            for sel, text in expect.texts:
                content = _evaluate(browser, _TEXT_JS % json.dumps(sel)) or ""
                if text not in " ".join(content.split()):
                    failures.append(Failure("text", f"{sel} does not contain {text!r}"))

            (scratch / (stem + ".dom.html")).write_text(
                _evaluate(browser, "document.documentElement.outerHTML"), encoding="utf-8")
            png = base64.b64decode(browser.call("Page.captureScreenshot", {"format": "png"})["data"])
            failures = _logged_problems(browser.events) + failures   # including any logged while checking
    except devtools_pipe.BrowserError as e:
        return Result(failures + [Failure("browser", f"{html.name}: {e}")])

    shot = scratch / (stem + ".png")
    shot.write_bytes(png)
    try:
        image = png_pixels.decode(png)
    except png_pixels.PngError as e:
        return Result(failures + [Failure("blank", f"screenshot cannot be read: {e}")], "", shot)
    ink = png_pixels.Ink(image)
    if (image.width, image.height) != tuple(window):
        failures.append(Failure("blank", f"screenshot is {image.width}x{image.height}, not {window[0]}x{window[1]}"))
    if ink.distinct_colours < expect.min_colours or ink.ink_share < expect.min_ink_share:
        failures.append(Failure("blank", f"screenshot looks blank: {ink.distinct_colours} colours, "
                                         f"{100 * ink.ink_share:.2f} % of pixels not white "
                                         f"(need {expect.min_colours} and {100 * expect.min_ink_share:.1f} %)"))
    summary = (f"{len(expect.selectors)} selectors and {len(expect.texts)} texts found, screenshot "
               f"{image.width}x{image.height} with {ink.distinct_colours} colours and "
               f"{100 * ink.ink_share:.1f} % ink ({shot})")
    return Result(failures, summary, shot)
