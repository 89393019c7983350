#!/usr/bin/env python3
"""Writes scenarios/demo.yaml, the bundled demo of knockon: an invented double-track line.

    python3 tools/make_demo_scenario.py            # (re)write scenarios/demo.yaml
    python3 tools/make_demo_scenario.py --check    # also print invariants and planning estimates

Why a generator: the signal positions follow from a few layout rules (home signal before each
platform, starter beyond it, open-line blocks split evenly), the overlaps from the gradient (B4)
and the spacing must be checked against the braking distance of every train type (B6); doing that
by hand for ~60 signals invites slips.  `--check` also runs a rough running-time and
blocking-time estimate (simple Euler steps in v^2 over a 1 m grid, sectional route release) that
was used to time the overtaking at Ferrowby Cross.  It is a planning aid for this file only; the
figures that count are the ones knockon itself computes.

The file also carries demo-grade primary delays (`delays:`, tests/REFERENCES.md P5/P6) for Monte Carlo
studies, and two variants for `knockon compare`: four-aspect signalling on the same signals, and
shorter blocks (an intermediate signal halfway along each open-line block longer than 2 km, with
four-aspect signalling so that two blocks give the braking distance, B6).

Everything here is invented: line, places, rolling stock, timetable, delays.  tests/REFERENCES.md tags
are cited beside the numbers they justify (B2/B3/B4/B6, C3, D7, D12, P5, P6).
"""
import argparse
import math
import os
import sys

G = 9.81
KMH = 1 / 3.6

# ---------------------------------------------------------------------------------------------
# The line (chainage in km)
# ---------------------------------------------------------------------------------------------
LENGTH_KM = 38.0

STATIONS = [  # id, name, at (stopping mark, km)
    ("MFQ", "Marrowfen Quay", 0.6),
    ("SLH", "Sallowmere Halt", 6.4),
    ("BKW", "Brackwillow", 12.5),
    ("FRX", "Ferrowby Cross", 18.8),
    ("NTR", "Nettlescar Road", 25.0),
    ("HBT", "Hobblethorpe", 31.2),
    ("WDS", "Wendlecombe Sands", 37.4),
]
AT = {sid: at for sid, _, at in STATIONS}

# Gradient bands (from km, per mille, rising towards increasing chainage).  Stations sit on level
# bands; the line climbs to a summit around Ferrowby Cross and falls towards Wendlecombe.
GRADIENTS = [
    (0.0, 0.0), (1.5, 5.0), (5.5, 0.0), (7.5, 10.0), (11.5, 0.0), (13.5, 4.0),
    (17.5, 0.0), (20.0, -10.0), (24.0, 0.0), (26.0, -6.0), (30.0, 0.0),
]
# Line speed bands (from km, km/h): 60 through the terminus throats, 120 on a curve stretch.
SPEEDS = [(0.0, 60), (1.6, 160), (26.5, 120), (29.0, 160), (36.2, 60)]

LOOP_FROM, LOOP_TO, LOOP_SPEED = 18.4, 19.2, 60   # overtaking loops at Ferrowby Cross
LOOP_STATION = "FRX"

HOME_BEFORE = 1.5     # home signal this far in rear of the stopping mark [km], so that the
                      # station block (home to starter) is at least a braking distance (B6)
TERMINUS_HOME_BEFORE = 0.45   # at the line ends, where the throat speed is 60 km/h
EXIT_AFTER = 0.25     # starter this far beyond the stopping mark [km]
MAX_BLOCK = 2.4       # open-line block lengths wanted: 1.6 .. 2.4 km
MIN_BLOCK = 1.6

SIGHTING = 300.0      # m, default
OVERLAP = 200.0       # m, default (B4: approach above 60 km/h)
DISTANT = 1200.0      # m, only used in two-aspect areas (none here)
ROUTE_SETUP, RELEASE, SIGHT_REACTION = 6.0, 3.0, 12.0   # s (B2 electronic 6-18 s, B3 12 s)

# ---------------------------------------------------------------------------------------------
# Rolling stock (SI inside this script; YAML text carries its own units)
# ---------------------------------------------------------------------------------------------
TYPES = {
    "EMU4": dict(
        length=110.0, mass=200e3, rho=1.08, vmax=140 * KMH, fmax=190e3, power=2.5e6, adh=0.0,
        a=2500.0, b=35.0, c=6.0, brake=0.8, delay=2.0, dwell=40.0, sup_pct=5.0, sup_100=60.0,
        yaml="""\
  # Four-car electric multiple unit for the stopping service.  rho 1.08: D12 (EMU 1.08-1.12).
  - id: EMU4
    length: 110 m
    mass: 200 t
    rotating_mass_factor: 1.08
    max_speed: 140 km/h
    traction: {max_force: 190 kN, power: 2.5 MW}
    resistance: {a: 2.5 kN, b: 35 N/(m/s), c: 6 N/(m/s)2}
    braking: {deceleration: 0.8 m/s2, delay: 2 s}
    performance: 100 %
    min_dwell: 40 s
    supplement: {percent: 5 %, per_100km: 1 min, threshold: 30 km}   # UIC 451-1 style (C3): multiple unit
"""),
    "LH160": dict(
        length=200.0, mass=400e3, rho=1.06, vmax=160 * KMH, fmax=300e3, power=5.6e6, adh=84e3,
        a=5000.0, b=1.7 * 10 * 3.6, c=0.062 * 10 * 12.96, brake=0.7, delay=2.0, dwell=60.0,
        sup_pct=5.0, sup_100=90.0,
        yaml="""\
  # Loco-hauled fast train: one 84 t, 5.6 MW locomotive (tractive envelope as tests/REFERENCES.md D7,
  # with the Curtius-Kniffler adhesion cap) and coaches, 400 t.  rho 1.06: D12 (loco-hauled 1.06-1.07).
  # Davis in daN and km/h: a 500 daN = 5 kN, b 1.7 daN/(km/h) = 61.2 N/(m/s), c 0.062 daN/(km/h)2 = 8.04 N/(m/s)2 (D1 factors).
  - id: LH160
    length: 200 m
    mass: 400 t
    rotating_mass_factor: 1.06
    max_speed: 160 km/h
    traction: {max_force: 300 kN, power: 5.6 MW, adhesion_mass: 84 t}
    resistance: {a: 500 daN, b: 1.7 daN/(km/h), c: 0.062 daN/(km/h)2}
    braking: {deceleration: 0.7 m/s2, delay: 2 s}
    performance: 100 %
    min_dwell: 60 s
    supplement: {percent: 5 %, per_100km: 1.5 min, threshold: 30 km}   # UIC 451-1 style (C3): loco-hauled
"""),
    "FRT1600": dict(
        length=600.0, mass=1600e3, rho=1.06, vmax=100 * KMH, fmax=480e3, power=6.4e6, adh=168e3,
        a=16000.0, b=180.0, c=12.0, brake=0.35, delay=5.0, dwell=120.0, sup_pct=8.0, sup_100=90.0,
        yaml="""\
  # Heavy freight: two 84 t, 3.2 MW locomotives (240 kN each) and wagons, 1600 t, 600 m.
  # rho 1.06: D12 (loco-hauled).  Davis: 16 kN = 1 daN/t at rest, about 1.9 daN/t at 100 km/h.
  # Low service braking (0.35 m/s2) and a long brake build-up, as for a long air-braked train.
  - id: FRT1600
    length: 600 m
    mass: 1600 t
    rotating_mass_factor: 1.06
    max_speed: 100 km/h
    traction: {max_force: 480 kN, power: 6.4 MW, adhesion_mass: 168 t}
    resistance: {a: 16 kN, b: 180 N/(m/s), c: 12 N/(m/s)2}
    braking: {deceleration: 0.35 m/s2, delay: 5 s}
    performance: 100 %
    min_dwell: 2 min
    supplement: {percent: 8 %, per_100km: 1.5 min, threshold: 30 km}   # UIC 451-1 style (C3): freight
"""),
}

# ---------------------------------------------------------------------------------------------
# Timetable patterns.  Times: origin departure (or entry pass) given; the overtaken stopping
# train's departure from the loop is fixed; everything else is constructed by knockon.
# ---------------------------------------------------------------------------------------------
UP_ORDER = [s[0] for s in STATIONS]
DOWN_ORDER = list(reversed(UP_ORDER))
FAST_STOPS = {"MFQ", "HBT", "WDS"}

PATTERNS = [
    # id, type, category, direction, first origin time, every, until, loop departure (or None)
    dict(id="SU", type="EMU4", cat="stopping", dir="up", first="06:00", every=60,
         until="21:00", loop_dep="06:20",
         note="stopping, up, :00 - stands in loop U2 at Ferrowby Cross while FU overtakes"),
    dict(id="SU", type="EMU4", cat="stopping", dir="up", first="06:30", every=60,
         until="21:30", loop_dep=None, suffix="X",
         note="stopping, up, :30 - not overtaken"),
    dict(id="FU", type="LH160", cat="fast", dir="up", first="06:08", every=60,
         until="21:08", note="fast, up: Marrowfen Quay, Hobblethorpe, Wendlecombe Sands"),
    dict(id="GU", type="FRT1600", cat="freight", dir="up", first="06:22", every=120,
         until="20:22", note="freight, up: enters at 0 km, leaves beyond 38 km"),
    dict(id="SD", type="EMU4", cat="stopping", dir="down", first="06:10", every=60,
         until="21:10", loop_dep="06:30:30",
         note="stopping, down, :10 - stands in loop D2 at Ferrowby Cross while FD overtakes"),
    dict(id="SD", type="EMU4", cat="stopping", dir="down", first="06:40", every=60,
         until="21:40", loop_dep=None, suffix="X",
         note="stopping, down, :40 - not overtaken"),
    dict(id="FD", type="LH160", cat="fast", dir="down", first="06:16", every=60,
         until="21:16", note="fast, down: Wendlecombe Sands, Hobblethorpe, Marrowfen Quay"),
    dict(id="GD", type="FRT1600", cat="freight", dir="down", first="07:30", every=120,
         until="21:30", note="freight, down: enters at 38 km, leaves beyond 0 km"),
]

# Links between runs (README "Links"), so that lateness passes from one service to another at the
# termini and at two changes of train.  Each terminus has one track per direction, so a set cannot
# reverse there (a turnaround keeps the set on its platform track); the crews turn round instead:
# a crew link at each terminus, the thin one at Wendlecombe Sands (3.5 min of buffer).  The two
# connections serve the halts the fast trains pass: from the up fast to the down stopping train at
# Hobblethorpe (for Nettlescar Road), and from the down fast to the up stopping train at Marrowfen
# Quay (for Sallowmere Halt and Brackwillow).
LINKS = [
    ("{from: SUX-0630, crew_to: SD-0710, crew_change: 6 min}", "crew turns round at Wendlecombe Sands"),
    ("{from: SD-0710, crew_to: SU-0800, crew_change: 6 min}", "and again at Marrowfen Quay"),
    ("{from: FU-0708, feeds: SDX-0740, at: HBT, transfer: 3 min, max_wait: 3 min}", "change for Nettlescar Road"),
    ("{from: FD-0716, feeds: SU-0800, at: MFQ, transfer: 4 min, max_wait: 3 min}", "change for the halts"),
]


# ---------------------------------------------------------------------------------------------
# Infrastructure helpers
# ---------------------------------------------------------------------------------------------
def band_value(bands, x_km):
    v = bands[0][1]
    for frm, val in bands:
        if x_km >= frm - 1e-9:
            v = val
    return v


def line_speed(x_km):
    return band_value(SPEEDS, x_km) * KMH


def gradient(x_km):
    return band_value(GRADIENTS, x_km) / 1000.0


def falling_permille(x_from_km, x_to_km, direction):
    """Steepest falling gradient met by a train of `direction` between the two chainages."""
    lo, hi = min(x_from_km, x_to_km), max(x_from_km, x_to_km)
    worst = 0.0
    pts = [lo] + [f for f, _ in GRADIENTS if lo < f < hi]
    for p in pts:
        g = band_value(GRADIENTS, p + 1e-6)
        fall = -g if direction == "up" else g
        worst = max(worst, fall)
    return worst


def b4_overlap(x_km, direction, approach_kmh):
    """tests/REFERENCES.md B4 (one national practice): by approach speed, +10 % per per mille of
    falling gradient, capped at 300 m.  The gradient looked at: 500 m in rear to 300 m ahead."""
    if approach_kmh <= 30:
        return 0.0
    if approach_kmh <= 40:
        base = 50.0
    elif approach_kmh <= 60:
        base = 100.0
    else:
        base = 200.0
    sgn = 1 if direction == "up" else -1
    fall = falling_permille(x_km - sgn * 0.5, x_km + sgn * 0.3, direction)
    return min(300.0, base * (1 + 0.1 * fall)) if base > 0 else 0.0


def make_signals():
    """Signals per direction, in running order: (id, track, at_km, direction, role, overlap_m)."""
    out = []
    for direction in ("up", "down"):
        sgn = 1 if direction == "up" else -1
        order = UP_ORDER if direction == "up" else DOWN_ORDER
        track = "U" if direction == "up" else "D"
        marks = []   # (at_km, role)
        for sid in order:
            at = AT[sid]
            before = TERMINUS_HOME_BEFORE if sid in (order[0], order[-1]) else HOME_BEFORE
            marks.append((round(at - sgn * before, 3), f"{sid} home"))
            marks.append((round(at + sgn * EXIT_AFTER, 3), f"{sid} starter"))
        seq = [marks[0]]
        for (x0, r0), (x1, r1) in zip(marks, marks[1:]):
            if r0.endswith("starter"):   # open line between a starter and the next home
                gap = abs(x1 - x0)
                n = math.ceil(gap / MAX_BLOCK - 1e-9)
                for k in range(1, n):
                    seq.append((round(x0 + sgn * gap * k / n, 3), "block"))
            seq.append((x1, r1))
        for i, (x, role) in enumerate(seq, start=1):
            sig_id = f"{track}{i:02d}"
            approach = max(line_speed(x - sgn * 0.01) / KMH, line_speed(x + sgn * 0.01) / KMH)
            ov = b4_overlap(x, direction, approach)
            out.append(dict(id=sig_id, track=track, at=x, dir=direction, role=role, overlap=ov))
            if role == f"{LOOP_STATION} starter":
                # The loop's own starter at the same chainage; approached at <= 60 km/h: B4 gives
                # 100 m, which keeps the overlap inside the loop, clear of the main line.
                out.append(dict(id=sig_id + "L", track=track + "2", at=x, dir=direction,
                                role=f"{LOOP_STATION} loop starter",
                                overlap=b4_overlap(x, direction, LOOP_SPEED)))
    return out


SIGNALS = make_signals()

SPLIT_OVER = 2.0      # shorter_blocks variant: open-line blocks longer than this [km] get an
                      # intermediate block signal halfway


def is_station_block(a, b):
    """Home to starter of one station: not open line."""
    return a["role"].endswith(" home") and b["role"].endswith(" starter")


def split_blocks(signals, over_km):
    """The signals with an intermediate block signal halfway along every open-line block longer
    than over_km.  Existing ids are kept (so results per signal can be compared with the base);
    the new signal takes the id of the one in rear plus "A"."""
    out = []
    for direction in ("up", "down"):
        sgn = 1 if direction == "up" else -1
        mine = [s for s in signals if s["dir"] == direction]
        main = [s for s in mine if not s["track"].endswith("2")]
        for s in mine:
            out.append(s)
            if s["track"].endswith("2"):
                continue
            k = main.index(s)
            if k + 1 == len(main):
                continue
            b = main[k + 1]
            gap = abs(b["at"] - s["at"])
            if gap > over_km + 1e-9 and not is_station_block(s, b):
                x = round(s["at"] + sgn * gap / 2, 3)
                approach = max(line_speed(x - sgn * 0.01) / KMH, line_speed(x + sgn * 0.01) / KMH)
                out.append(dict(id=s["id"] + "A", track=s["track"], at=x, dir=direction,
                                role="intermediate block", overlap=b4_overlap(x, direction, approach)))
    return out


SHORT_SIGNALS = split_blocks(SIGNALS, SPLIT_OVER)


# ---------------------------------------------------------------------------------------------
# YAML output
# ---------------------------------------------------------------------------------------------
def km(x):
    s = f"{x:.3f}".rstrip("0")
    if s.endswith("."):
        s += "0"
    return s + " km"


def hhmm(t):
    t = int(round(t))
    h, m, s = t // 3600, (t // 60) % 60, t % 60
    return f"{h:02d}:{m:02d}" + (f":{s:02d}" if s else "")


def parse_time(s):
    parts = [int(p) for p in s.split(":")]
    while len(parts) < 3:
        parts.append(0)
    return parts[0] * 3600 + parts[1] * 60 + parts[2]


def braking_distance(t, v, fall_permille):
    """v * delay + v^2 / (2 (b - g i)): tests/REFERENCES.md D11 form, falling gradient i."""
    b = t["brake"] - G * fall_permille / 1000.0
    return v * t["delay"] + v * v / (2 * b)


def spacing_table(signals=None):
    """Worst open-line block (shortest margin) per type; used for the B6 comment and --check."""
    signals = SIGNALS if signals is None else signals
    rows = []
    for direction in ("up", "down"):
        sigs = [s for s in signals if s["dir"] == direction and not s["track"].endswith("2")]
        for a, b in zip(sigs, sigs[1:]):
            length = abs(b["at"] - a["at"]) * 1000
            fall = falling_permille(a["at"], b["at"], direction)
            vline = max(line_speed(x / 1000) for x in
                        range(int(min(a["at"], b["at"]) * 1000), int(max(a["at"], b["at"]) * 1000) + 1, 50))
            station_block = is_station_block(a, b)
            for tid, t in TYPES.items():
                v = min(vline, t["vmax"])
                d = braking_distance(t, v, fall)
                rows.append(dict(a=a, b=b, length=length, fall=fall, type=tid, v=v, d=d,
                                 station=station_block))
    return rows


def header_comment():
    rows = [r for r in spacing_table() if not r["station"]]
    worst = {}
    for r in rows:
        m = r["length"] - r["d"]
        if r["type"] not in worst or m < worst[r["type"]][0]:
            worst[r["type"]] = (m, r)
    lines = []
    for tid in TYPES:
        m, r = worst[tid]
        lines.append(
            f"  #   {tid:8s} {r['v'] / KMH:5.0f} km/h, falling {r['fall']:4.1f} per mille: braking distance "
            f"{r['d']:6.0f} m in block {r['a']['id']}-{r['b']['id']} of {r['length']:5.0f} m "
            f"(margin {m:4.0f} m)")
    setter = min(worst, key=lambda k: worst[k][0])
    return lines, setter


def signal_lines(signals, indent):
    lines = []
    for direction in ("up", "down"):
        lines.append(f"{indent}# direction {direction}, in running order")
        for s in (s for s in signals if s["dir"] == direction):
            extra = "" if abs(s["overlap"] - OVERLAP) < 1e-6 else f", overlap: {s['overlap']:.0f} m"
            body = f"{{id: {s['id']}, track: {s['track']}, at: {km(s['at'])}, direction: {direction}{extra}}}"
            lines.append(f"{indent}- {body:<76s} # {s['role']}")
    return lines


# Primary delays for Monte Carlo studies: (category, probability %, mean min) of late entry or
# start, tests/REFERENCES.md P5 (suburban -> stopping, long-distance -> fast, freight).
ENTRY_DELAYS = [("stopping", 20, 1.3, "P5 suburban: 20 %, mean 1.3 min"),
                ("fast", 50, 5.0, "P5 long-distance: 50 %, mean 5.0 min"),
                ("freight", 40, 20.0, "P5 freight: 40 %, mean 20 min")]


def delay_lines():
    lines = [
        "# Primary delays for `knockon simulate --replications` and `knockon compare`.  DEMO-GRADE, NOT",
        "# FOR REAL STUDIES: the entry figures come second-hand from one national capacity",
        "# guideline (tests/REFERENCES.md P5), the shapes follow published fits (P6), and the dwell, running and",
        "# disruption figures are invented to make the demo show something.  A real study fits these to",
        "# the line's own delay records.",
        "delays:",
        "  # Late start at the origin or late entry at the line end, exponential (P6: departure delays",
        "  # fit an exponential or a Weibull with shape below 1).",
        "  entry:",
    ]
    for cat, p, m, note in ENTRY_DELAYS:
        body = f"{{category: {cat}, probability: {p} %, distribution: exponential, mean: {m:g} min}}"
        lines.append(f"    - {body:<92s} # {note}")
    lines += [
        "  # Extra dwell at stops: Weibull with shape above 1 (P6: dwell times), mean 40 s x Gamma(1 + 1/1.5)",
        "  # = 36 s, at one stop in ten for the stopping trains and one in twenty for the fast ones.",
        "  dwell:",
        "    - {category: stopping, probability: 10 %, distribution: weibull, shape: 1.5, scale: 40 s}",
        "    - {category: fast, probability: 5 %, distribution: weibull, shape: 1.5, scale: 60 s}",
        "  # Slow running (e.g. a speed restriction not in the timetable): rare and short, any train.",
        "  running:",
        "    - {probability: 3 %, distribution: exponential, mean: 30 s}",
        "  # A rare failure on the down main line over the Nettlescar fall: about one day in fifty, for",
        "  # 20 min on average, some time between 06:00 and 21:00.",
        "  disruptions:",
        "    - {track: D, from: 20 km, to: 24 km, daily_probability: 2 %, distribution: exponential, mean: 20 min,",
        "       window: [\"06:00\", \"21:00\"]}",
    ]
    return lines


def variant_lines():
    area = f"{{areas: [{{from: 0 km, to: {km(LENGTH_KM)}, system: four_aspect}}]}}"
    split = [s for s in SHORT_SIGNALS if s["role"] == "intermediate block"]
    rows = four_aspect_table(SHORT_SIGNALS)
    worst = min(rows, key=lambda r: r["length"] - r["d"])
    lines = [
        "# Variants for `knockon compare` (and `plan`/`simulate --variant NAME`): each is merged onto the",
        "# scenario above, maps key by key, lists replaced whole.",
        "variants:",
        "  four_aspect:",
        "    description: four-aspect signalling on the same signal positions",
        "    # A driver may read three blocks ahead instead of two (B5).  The blocks are already a braking",
        "    # distance long (B6 three-aspect), so the warning points stay one signal back and the minimum",
        "    # headways cannot grow; nor do they shrink: on this layout the extra aspect alone buys little",
        "    # or nothing.  Compare it with shorter_blocks, which the fourth aspect makes possible.",
        f"    infrastructure: {{signalling: {area}}}",
        "  shorter_blocks:",
        f"    description: intermediate block signals halfway along the {len(split)} open-line blocks longer than "
        f"{SPLIT_OVER:g} km, four-aspect",
        "    # Halved blocks (1.0-1.2 km) are shorter than a braking distance from 160 km/h, so they need",
        "    # four-aspect signalling: two blocks together at least a braking distance (B6 four-aspect).",
        f"    # Tightest pair of blocks: {worst['type']} needs {worst['d']:.0f} m over {worst['a']['id']}-"
        f"{worst['c']['id']} of {worst['length']:.0f} m.",
        "    # New signals take the id of the signal in rear plus A; the others keep their ids.",
        "    infrastructure:",
        f"      signalling: {area}",
        "      signals:",
    ]
    lines += signal_lines(SHORT_SIGNALS, "        ")
    return lines


def emit_yaml():
    out = []
    w = out.append
    w("# GENERATED by tools/make_demo_scenario.py - edit the script, not this file, then rerun it.")
    w("#")
    w("# knockon demo: the Marrowfen-Wendlecombe line.  An INVENTED line with INVENTED data: no real")
    w("# line, place, operator or rolling stock is described.  Every figure computed from it is a")
    w("# planning estimate only; signal positions, braking distances and overlaps are for licensed")
    w("# signalling engineers to decide under local rules.")
    w("#")
    w("# Layout: 38 km of double track (U = up, towards increasing chainage; D = down), 7 stations,")
    w("# overtaking loops U2/D2 at Ferrowby Cross (18.4-19.2 km, 60 km/h turnouts).  Traffic, each way:")
    w("# stopping EMUs every 30 min 06:00-21:40, fast trains hourly (Marrowfen Quay, Hobblethorpe,")
    w("# Wendlecombe Sands only), freight every 2 h through from line end to line end.  The :00 up and")
    w("# :10 down stopping trains stand in the loop at Ferrowby Cross (6 and 5.5 min) while the fast")
    w("# train overtakes.  The buffers around that overtaking, and behind the up fast train at")
    w("# Hobblethorpe, are thin on purpose (under a minute): the first places a planner should look.")
    w("#")
    w("# At the end: demo-grade primary delays for Monte Carlo studies, and two variants (four-aspect")
    w("# signalling; shorter blocks) for knockon compare.")
    w("")
    w("knockon: 1")
    w("name: Marrowfen-Wendlecombe demo line (invented)")
    w("line_type: mixed")
    w("")
    w("infrastructure:")
    w(f"  length: {km(LENGTH_KM)}")
    w("  # Stations on level bands; a climb of up to 10 per mille to the summit at Ferrowby Cross and a")
    w("  # 10 per mille fall beyond it.")
    w("  gradients:")
    for frm, val in GRADIENTS:
        w(f"    - {{from: {km(frm)}, value: {val:g} per mille}}")
    w("  # 80 km/h through the terminus throats, 160 km/h open line, a 120 km/h curve stretch.")
    w("  speed_limits:")
    for frm, val in SPEEDS:
        w(f"    - {{from: {km(frm)}, value: {val} km/h}}")
    w("  tracks:")
    w(f"    - {{id: U, from: 0 km, to: {km(LENGTH_KM)}, directions: up}}")
    w(f"    - {{id: D, from: 0 km, to: {km(LENGTH_KM)}, directions: down}}")
    w("    # Overtaking loops beside each main track, left and rejoined through 60 km/h turnouts.")
    w(f"    - {{id: U2, parent: U, from: {km(LOOP_FROM)}, to: {km(LOOP_TO)}, directions: up, speed_limit: {LOOP_SPEED} km/h}}")
    w(f"    - {{id: D2, parent: D, from: {km(LOOP_FROM)}, to: {km(LOOP_TO)}, directions: down, speed_limit: {LOOP_SPEED} km/h}}")
    w("  stations:")
    for sid, name, at in STATIONS:
        w(f"    - {{id: {sid}, name: {name}, at: {km(at)}}}")
    w("  signalling:")
    w("    areas:")
    w(f"      - {{from: 0 km, to: {km(LENGTH_KM)}, system: three_aspect}}")
    w("    # Overlap 200 m beyond a signal approached above 60 km/h (tests/REFERENCES.md B4); signals on or")
    w("    # just beyond a falling gradient carry their own, longer overlap (B4: +10 % per per mille, cap 300 m).")
    w(f"    defaults: {{sighting_distance: {SIGHTING:.0f} m, overlap: {OVERLAP:.0f} m, distant_distance: {DISTANT:.0f} m}}")
    w("    # Electronic interlocking: route setup 6 s (B2: relay/electronic 6-18 s); release 3 s;")
    w("    # sight and reaction 12 s (B3).")
    w(f"    interlocking: {{route_setup: {ROUTE_SETUP:.0f} s, release: {RELEASE:.0f} s, sight_reaction: {SIGHT_REACTION:.0f} s}}")
    lines, setter = header_comment()
    w("  # Three-aspect signals.  Homes stand 1.5 km in rear of the stopping mark (450 m at the termini,")
    w("  # whose throats are limited to 60 km/h), starters 250 m beyond it")
    w("  # (more than an overlap's length, so a train overrunning the mark still stops short of the")
    w("  # starter); the open line between a starter and the next home is cut into equal blocks of")
    w("  # 1.6-2.4 km.  B6 (three-aspect): a block must be at least the braking distance from the speed")
    w("  # a train may have at the signal in rear.  Braking distance = speed x brake delay +")
    w("  # v^2 / (2 (b - g i)) on the steepest falling gradient i in the block (D11 form).  Tightest")
    w("  # open-line block per type:")
    out.extend(lines)
    w(f"  # so the {setter} fast train at 160 km/h on the 10 per mille falls sets the spacing; the freight")
    w("  # brakes far less hard but runs at 100 km/h at most and comes close second; the EMU is never near.")
    w("  # The station blocks (home to starter, 1.75 km) are at least a braking distance from line speed,")
    w("  # so a through train is warned in time at the signal in rear (B6); at the termini the 60 km/h")
    w("  # throat keeps the 700 m station block long enough.")
    w("  signals:")
    out.extend(signal_lines(SIGNALS, "    "))
    w("")
    w("train_types:")
    for t in TYPES.values():
        out.append(t["yaml"].rstrip("\n"))
    w("")
    w("timetable:")
    w("  rounding: 30 s")
    w("  # Origin times are given; intermediate times are constructed by knockon from the running time")
    w("  # plus supplement, except the departure of the overtaken stopping train from the loop, which is")
    w("  # fixed so that it waits there for the fast train (min_dwell 5 min as a floor).")
    w("  services:")
    for p in PATTERNS:
        w(f"    # {p['note']}")
        sid = p["id"] + p.get("suffix", "")
        w(f"    - id: {sid}")
        w(f"      type: {p['type']}")
        w(f"      category: {p['cat']}")
        w(f"      direction: {p['dir']}")
        if p["cat"] == "freight":
            w("      enter: {}")
            w("      leave: true")
        w(f"      repeat: {{every: {p['every']} min, until: \"{p['until']}\"}}")
        w("      calls:")
        order = UP_ORDER if p["dir"] == "up" else DOWN_ORDER
        loop = "U2" if p["dir"] == "up" else "D2"
        for k, st in enumerate(order):
            if p["cat"] == "freight":
                call = (f"{{station: {st}, pass: \"{p['first']}\"}}" if k == 0
                        else f"{{station: {st}, pass: auto}}")
            elif p["cat"] == "fast":
                if k == 0:
                    call = f"{{station: {st}, dep: \"{p['first']}\"}}"
                elif st in FAST_STOPS:
                    call = f"{{station: {st}}}"
                else:
                    call = f"{{station: {st}, pass: auto}}"
            else:
                if k == 0:
                    call = f"{{station: {st}, dep: \"{p['first']}\"}}"
                elif st == LOOP_STATION and p.get("loop_dep"):
                    call = (f"{{station: {st}, dep: \"{p['loop_dep']}\", track: {loop}, min_dwell: 5 min}}"
                            "   # overtaken here")
                else:
                    call = f"{{station: {st}}}"
            w(f"        - {call}")
    w("  # Crew links at both termini and two connections (see LINKS in the generator).")
    w("  links:")
    for link, note in LINKS:
        w(f"    - {link}   # {note}")
    w("")
    out.extend(delay_lines())
    w("")
    out.extend(variant_lines())
    return "\n".join(out) + "\n"


# ---------------------------------------------------------------------------------------------
# --check: invariants
# ---------------------------------------------------------------------------------------------
def check_invariants():
    problems = []
    tracks = {"U": (0.0, LENGTH_KM), "D": (0.0, LENGTH_KM),
              "U2": (LOOP_FROM, LOOP_TO), "D2": (LOOP_FROM, LOOP_TO)}
    for s in SIGNALS:
        lo, hi = tracks[s["track"]]
        if not (lo <= s["at"] <= hi):
            problems.append(f"{s['id']} at {s['at']} outside track {s['track']} [{lo}, {hi}]")
        sgn = 1 if s["dir"] == "up" else -1
        end = s["at"] + sgn * s["overlap"] / 1000
        if s["track"].endswith("2") and not (lo < end < hi):
            problems.append(f"{s['id']}: overlap end {end:.3f} leaves the loop")
        if s["role"].endswith("starter") and "loop" not in s["role"]:
            st = s["role"].split()[0]
            if abs(s["at"] - AT[st]) * 1000 < OVERLAP:
                problems.append(f"{s['id']}: starter closer to the stopping mark than the overlap")
    for direction in ("up", "down"):
        sigs = [s for s in SIGNALS if s["dir"] == direction and not s["track"].endswith("2")]
        xs = [s["at"] for s in sigs]
        if direction == "down":
            xs = [-x for x in xs]
        if xs != sorted(xs) or len(set(xs)) != len(xs):
            problems.append(f"{direction} signals out of order")
        for a, b in zip(sigs, sigs[1:]):
            L = abs(b["at"] - a["at"])
            if a["role"] == "block" or b["role"] == "block" or (
                    a["role"].endswith("starter") and b["role"].endswith("home")):
                if not (MIN_BLOCK - 1e-9 <= L <= MAX_BLOCK + 1e-9):
                    problems.append(f"open-line block {a['id']}-{b['id']} {L:.3f} km outside 1.6-2.4")
    # Home signals of the loop station must stand in rear of the turnouts.
    for s in SIGNALS:
        if s["role"] == f"{LOOP_STATION} home":
            ok = s["at"] < LOOP_FROM if s["dir"] == "up" else s["at"] > LOOP_TO
            if not ok:
                problems.append(f"{s['id']}: home signal not in rear of the loop turnout")
        if "loop starter" in s["role"] and not (LOOP_FROM < AT[LOOP_STATION] < s["at"] < LOOP_TO
                                                or LOOP_FROM < s["at"] < AT[LOOP_STATION] < LOOP_TO):
            problems.append(f"{s['id']}: loop starter not between stopping mark and loop end")
    for r in spacing_table():
        if not r["station"] and r["d"] > r["length"]:
            problems.append(f"B6: {r['type']} needs {r['d']:.0f} m in block {r['a']['id']}-{r['b']['id']} "
                            f"of {r['length']:.0f} m")
    problems += check_short_blocks()
    return problems


def four_aspect_table(signals):
    """B6 (four-aspect): two consecutive blocks together at least the braking distance from the
    speed at the first signal.  One row per pair of blocks on the open line and type."""
    rows = []
    for direction in ("up", "down"):
        sigs = [s for s in signals if s["dir"] == direction and not s["track"].endswith("2")]
        for a, b, c in zip(sigs, sigs[1:], sigs[2:]):
            if is_station_block(a, b) or is_station_block(b, c):
                continue
            length = abs(c["at"] - a["at"]) * 1000
            fall = falling_permille(a["at"], c["at"], direction)
            lo, hi = sorted((a["at"], c["at"]))
            vline = max(line_speed(x / 1000) for x in range(int(lo * 1000), int(hi * 1000) + 1, 50))
            for tid, t in TYPES.items():
                v = min(vline, t["vmax"])
                rows.append(dict(a=a, c=c, length=length, type=tid, v=v, d=braking_distance(t, v, fall)))
    return rows


def check_short_blocks():
    """The shorter_blocks variant: signals in order, halves at least 0.8 km, B6 four-aspect."""
    problems = []
    for direction in ("up", "down"):
        sigs = [s for s in SHORT_SIGNALS if s["dir"] == direction and not s["track"].endswith("2")]
        xs = [s["at"] if direction == "up" else -s["at"] for s in sigs]
        if xs != sorted(xs) or len(set(xs)) != len(xs):
            problems.append(f"shorter_blocks: {direction} signals out of order")
        for a, b in zip(sigs, sigs[1:]):
            if "intermediate" in a["role"] + b["role"] and abs(b["at"] - a["at"]) < MIN_BLOCK / 2 - 1e-9:
                problems.append(f"shorter_blocks: block {a['id']}-{b['id']} shorter than {MIN_BLOCK / 2} km")
    for r in four_aspect_table(SHORT_SIGNALS):
        if r["d"] > r["length"]:
            problems.append(f"shorter_blocks, B6 four-aspect: {r['type']} needs {r['d']:.0f} m over "
                            f"{r['a']['id']}-{r['c']['id']} of {r['length']:.0f} m")
    return problems


# ---------------------------------------------------------------------------------------------
# --check: rough running and blocking times (planning aid only)
# ---------------------------------------------------------------------------------------------
class Path:
    """A service's path: s (m from path start) <-> chainage, track used at each s."""

    def __init__(self, direction, x_start_km, x_end_km, loop_station_track=False):
        self.dir = direction
        self.sgn = 1 if direction == "up" else -1
        self.x0 = x_start_km * 1000
        self.length = abs(x_end_km - x_start_km) * 1000
        self.loop = loop_station_track

    def x(self, s):
        return self.x0 + self.sgn * s

    def s_of(self, x_km):
        return (x_km * 1000 - self.x0) * self.sgn

    def on_loop(self, s):
        return self.loop and LOOP_FROM * 1000 <= self.x(s) <= LOOP_TO * 1000

    def track(self, s):
        main = "U" if self.dir == "up" else "D"
        return main + "2" if self.on_loop(s) else main

    def limit(self, s, vmax):
        v = min(vmax, line_speed(self.x(s) / 1000 - (1e-6 if self.sgn < 0 else 0)))
        if self.on_loop(s):
            v = min(v, LOOP_SPEED * KMH)
        return v

    def grad(self, s):
        return self.sgn * gradient(self.x(s) / 1000 - (1e-6 if self.sgn < 0 else 0))


def tractive(t, v):
    f = t["fmax"]
    if v > 0.1:
        f = min(f, t["power"] / v)
    if t["adh"] > 0:
        mu = 0.161 + 7.5 / (v / KMH + 44)   # D6 Curtius-Kniffler
        f = min(f, mu * t["adh"] * G)
    return f


def run_leg(t, path, s_a, v_a, s_b, stop):
    """Fastest run from s_a to s_b; returns (list of s, list of v, list of t)."""
    n = int(round(s_b - s_a))
    ss = [s_a + i * (s_b - s_a) / n for i in range(n + 1)]
    # Tail rule: the head's limit is the lowest static limit under the train (sliding minimum
    # over the train length, including the track behind the leg start).
    L = int(t["length"])
    back = [path.limit(s_a - L + i, t["vmax"]) for i in range(L) if s_a - L + i >= 0]
    static = back + [path.limit(s, t["vmax"]) for s in ss]
    off = len(back)
    from collections import deque
    dq, tail = deque(), []
    for j, val in enumerate(static):
        while dq and static[dq[-1]] >= val:
            dq.pop()
        dq.append(j)
        while dq[0] < j - L:
            dq.popleft()
        if j >= off:
            tail.append(static[dq[0]])
    env = list(tail)
    if stop:
        env[-1] = 0.0
    ds = (s_b - s_a) / n
    for i in range(n - 1, -1, -1):
        b = max(0.05, t["brake"] + G * path.grad(ss[i]))
        env[i] = min(env[i], math.sqrt(env[i + 1] ** 2 + 2 * b * ds))
    v = [min(v_a, env[0])]
    for i in range(n):
        vi = v[-1]
        a = (tractive(t, vi) - (t["a"] + t["b"] * vi + t["c"] * vi * vi)
             - t["mass"] * G * path.grad(ss[i])) / (t["rho"] * t["mass"])
        v.append(min(env[i + 1], math.sqrt(max(0.0, vi * vi + 2 * a * ds))))
    tt = [0.0]
    for i in range(n):
        vm = v[i] + v[i + 1]
        tt.append(tt[-1] + (2 * ds / vm if vm > 1e-6 else 1e9))
    return ss, v, tt


def ceil30(x):
    return math.ceil(x / 30.0 - 1e-9) * 30.0


class Run:
    """A constructed timetable run with a time-at-position function for head and tail."""

    def __init__(self, pattern, t0):
        p = pattern
        self.p = p
        t = TYPES[p["type"]]
        self.t = t
        order = UP_ORDER if p["dir"] == "up" else DOWN_ORDER
        freight = p["cat"] == "freight"
        if freight:
            x_start = 0.0 if p["dir"] == "up" else LENGTH_KM
            x_end = LENGTH_KM - x_start
        else:
            x_start, x_end = AT[order[0]], AT[order[-1]]
        self.path = Path(p["dir"], x_start, x_end, loop_station_track=bool(p.get("loop_dep")))
        stops = []   # (s, station, stops?)
        for st in order:
            s = self.path.s_of(AT[st])
            stop = (not freight) and (p["cat"] != "fast" or st in FAST_STOPS)
            stops.append((s, st, stop))
        length_km = self.path.length / 1000
        dist_part = t["sup_100"] * length_km / 100 if length_km > 30 else 0.0
        self.events = {}   # station -> (arr, dep)
        # Build legs between stops, stretching technical time by the supplement.
        self.samples = []  # (s, scheduled time)
        legs_at = [0.0] + [s for s, _, stop in stops if stop and s > 0] + \
                  ([self.path.length] if freight else [])
        legs_at = sorted(set(legs_at))
        v_in = self.path.limit(0, t["vmax"]) if freight else 0.0
        time = t0
        if freight:   # t0 is the pass time at the first station; back off to the entry
            s1 = stops[0][0]
            ss, vv, tt = run_leg(t, self.path, 0.0, v_in, s1, False)
            time = t0 - tt[-1] * (1 + t["sup_pct"] / 100) - dist_part * s1 / self.path.length
        for a, b in zip(legs_at, legs_at[1:]):
            stop_end = not (freight and b >= self.path.length - 1e-6)
            ss, vv, tt = run_leg(t, self.path, a, v_in, b, stop_end)
            v_in = vv[-1] if not stop_end else 0.0
            k = (1 + t["sup_pct"] / 100)
            dp = dist_part * (b - a) / self.path.length
            for s, tm in zip(ss, tt):
                self.samples.append((s, time + tm * k + dp * (s - a) / (b - a)))
            arr = ceil30(self.samples[-1][1]) if stop_end else self.samples[-1][1]
            st = next((name for s, name, stop in stops if abs(s - b) < 1e-6), None)
            dep = arr
            if st and stop_end:
                dwell = t["dwell"]
                dep = ceil30(arr + dwell)
                if st == LOOP_STATION and p.get("loop_dep"):
                    dep = max(arr + 300, parse_time(p["loop_dep"]) + (t0 - parse_time(p["first"])))
                self.events[st] = (arr, dep)
                self.samples.append((b, dep))
            time = dep
        for s, st, stop in stops:
            if not stop:
                self.events[st] = (None, self.head_time(s))
        self.events[order[0]] = (None, t0)

    def head_time(self, s):
        """Last time the head is at s (after any dwell there); linear between samples."""
        sm = self.samples
        lo, hi = 0, len(sm) - 1
        if s <= sm[0][0]:
            return sm[0][1]
        if s >= sm[-1][0]:
            return sm[-1][1]
        while hi - lo > 1:
            mid = (lo + hi) // 2
            if sm[mid][0] <= s:
                lo = mid
            else:
                hi = mid
        while lo + 1 < len(sm) and sm[lo + 1][0] <= s:
            lo += 1
        (s0, t0), (s1, t1) = sm[lo], sm[min(lo + 1, len(sm) - 1)]
        if s1 <= s0:
            return t1
        return t0 + (t1 - t0) * (s - s0) / (s1 - s0)

    def first_time(self, s):
        """First time the head reaches s (before any dwell there)."""
        for (s0, t0), (s1, t1) in zip(self.samples, self.samples[1:]):
            if s0 <= s <= s1 and s1 > s0:
                return t0 + (t1 - t0) * (s - s0) / (s1 - s0)
        return self.head_time(s)

    def stop_between(self, s_lo, s_hi):
        """Departure time of a stop strictly inside (s_lo, s_hi], if any."""
        for st, (arr, dep) in self.events.items():
            if arr is None:
                continue
            s = self.path.s_of(AT[st])
            if s_lo < s <= s_hi:
                return dep
        return None

    def blocking(self):
        """{section key: (start, end)} with sectional release (see module doc)."""
        if getattr(self, "_blocking", None) is None:
            self._blocking = self._compute_blocking()
        return self._blocking

    def _compute_blocking(self):
        path = self.path
        sigs = []
        for sg in SIGNALS:
            if sg["dir"] != path.dir:
                continue
            s = path.s_of(sg["at"])
            if s < -1e-6 or s > path.length + 1e-6:
                continue
            if sg["track"] != path.track(s):
                continue
            sigs.append((s, sg))
        sigs.sort(key=lambda z: z[0])
        out = {}
        L = self.t["length"]
        prev = None
        for k, (s_sig, sg) in enumerate(sigs):
            # The route from this signal to the next one (or the path end), plus the next overlap.
            s_next = sigs[k + 1][0] if k + 1 < len(sigs) else path.length
            ov = sigs[k + 1][1]["overlap"] if k + 1 < len(sigs) else 0.0
            warn = (sigs[k - 1][0] if k > 0 else s_sig) - SIGHTING
            dep = self.stop_between(warn, s_sig)
            if dep is not None:
                start = dep - SIGHT_REACTION - ROUTE_SETUP
            else:
                start = self.first_time(max(0.0, warn)) - SIGHT_REACTION - ROUTE_SETUP
            end_s = min(path.length + 0.0, s_next + ov) if k + 1 < len(sigs) else path.length
            for a, b in cut_sections(path, s_sig, s_next + ov):
                tail_clear = self.head_time(min(path.length, b + L)) + RELEASE
                key = (path.track((a + b) / 2), round(path.x(a)), round(path.x(b)))
                key = (key[0], min(key[1], key[2]), max(key[1], key[2]))
                if key in out:
                    out[key] = (min(out[key][0], start), max(out[key][1], tail_clear))
                else:
                    out[key] = (start, tail_clear)
            prev = s_sig
        return out


def all_boundaries(track):
    xs = {0.0, LENGTH_KM * 1000, LOOP_FROM * 1000, LOOP_TO * 1000}
    for sg in SIGNALS:
        sgn = 1 if sg["dir"] == "up" else -1
        xs.add(round(sg["at"] * 1000))
        xs.add(round(sg["at"] * 1000 + sgn * sg["overlap"]))
    return sorted(xs)


def cut_sections(path, s_a, s_b):
    pts = set()
    for x in all_boundaries(None):
        s = path.s_of(x / 1000)
        if s_a < s < s_b:
            pts.add(s)
    pts = [s_a] + sorted(pts) + [s_b]
    return list(zip(pts, pts[1:]))


def smallest_gap(a, b):
    """Smallest gap between the blocking times of two runs on any shared section [s]
    (negative: they overlap, a conflict) and where it is."""
    ba, bb = a.blocking(), b.blocking()
    best, where = 1e9, None
    for key, (s1, e1) in ba.items():
        if key in bb:
            s2, e2 = bb[key]
            gap = max(s2 - e1, s1 - e2)
            if gap < best:
                best, where = gap, key
    return best, where


def check_timetable():
    for p in PATTERNS:
        r = Run(p, parse_time(p["first"]))
        order = UP_ORDER if p["dir"] == "up" else DOWN_ORDER
        cells = []
        for st in order:
            arr, dep = r.events.get(st, (None, None))
            if dep is None:
                continue
            cells.append(f"{st} {hhmm(arr) + '/' if arr else ''}{hhmm(dep)}")
        print(f"{p['id'] + p.get('suffix', ''):4s} " + "  ".join(cells))
    print("\nsmallest gap between blocking times per pair (rough, sectional release), two hours:")
    for direction in ("up", "down"):
        trains = []
        for p in PATTERNS:
            if p["dir"] != direction:
                continue
            for rep in range(0, 240 // p["every"]):
                t0 = parse_time(p["first"]) + rep * p["every"] * 60
                trains.append((f"{p['id'] + p.get('suffix', '')}-{hhmm(t0)}", Run(p, t0)))
        for i, (na, a) in enumerate(trains):
            for nb, b in trains[i + 1:]:
                gap, where = smallest_gap(a, b)
                if gap < 600:
                    print(f"  {direction:4s} {na:12s} / {nb:12s}: "
                          f"{'CONFLICT ' if gap < 0 else 'gap '}{abs(gap):5.0f} s at {where}")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--check", action="store_true")
    ap.add_argument("--out", default=os.path.join(os.path.dirname(__file__), "..", "scenarios", "demo.yaml"))
    args = ap.parse_args()
    text = emit_yaml()
    with open(args.out, "w") as f:
        f.write(text)
    if args.check:
        probs = check_invariants()
        for p in probs:
            print("PROBLEM:", p)
        print(f"{len(SIGNALS)} signals, {len(probs)} problems")
        check_timetable()
        return 1 if probs else 0
    return 0


if __name__ == "__main__":
    sys.exit(main())
