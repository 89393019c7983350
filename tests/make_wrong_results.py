#!/usr/bin/env python3
"""Writes results files with a wrong layout or wrong values, one defect each, for the tests of the
results reader (tests/test_results_hardening.cpp).

    make_wrong_results.py GOOD_DIR OUT_DIR [KIND ...]

GOOD_DIR holds day.h5, study.h5 and comparison.h5 as knockon wrote them (tools/results/HDF5_LAYOUT.md);
KIND (day, study, comparison; all three by default) says which of them to derive files from.
OUT_DIR receives one file per defect and manifest.tsv, one line per file:

    <file name> TAB <expect> TAB <which case: what was changed>

where <expect> is "refuse" when the layout says the file is not a knockon results file any more
(the reader must stop with exit status 2 naming the file), and "any" when the change may still be
a valid file (NaN where the layout allows it, a field the report does not use, ...).  Either way the
report must not crash, hang, use unbounded memory or print NaN or infinity.

Needs h5py and NumPy (Debian: python3-h5py).
"""
import os
import shutil
import sys

import h5py
import numpy as np

# ---- what the layout says (tools/results/HDF5_LAYOUT.md) ---------------------------------------------

# Fields the reader uses, per table (by the table's last path component).  A table or field not
# listed may be changed or dropped without making the file unreadable.
READ_FIELDS = {
    "trains": {"id"}, "sections": {"id"}, "trains_index": {"id"}, "sections_index": {"id"},
    "timing": {"train", "call", "station", "stops", "scheduled_arrival", "scheduled_departure", "arrival",
               "departure", "arrival_delay", "departure_delay", "knock_on"},
    "occupancy": {"train", "section", "locked", "head_enters", "head_leaves", "tail_clears", "released"},
    "holds": {"train", "signal", "from", "to"},
    "trajectories": {"train", "time", "position", "chainage", "speed"},
    "per_day": None,   # None: every field
    "summary": {"figure", "mean", "ci95_half_width", "ci95_lower", "ci95_upper", "n"},
    "timing_points": {"train", "station", "stops", "reached", "delay_mean", "delay_ci95_half_width", "p50", "p90",
                      "p95", "max", "knock_on_mean", "knock_on_ci95_half_width"},   # + punctual_*_share/lower/upper
    "trains_stats": {"train", "primary_mean", "primary_ci95_half_width", "knock_on_mean",
                     "knock_on_ci95_half_width", "final_delay_mean", "final_delay_ci95_half_width"},
    "signals": {"signal", "held_mean", "held_ci95_half_width"},
    "sections_stats": {"section", "blocked_share_mean", "blocked_share_ci95_half_width"},
    "buffers": {"leader", "follower", "line_section", "section", "planned", "as_run_mean", "as_run_ci95_half_width",
                "p10", "n"},
    "variants": {"name", "description", "headway_pairs", "mean_minimum_headway", "peak_hour_consumption",
                 "peak_hour_line_section", "day_consumption", "day_line_section"},
    "differences": {"variant", "figure", "unit", "mean", "ci95_half_width", "ci95_lower", "ci95_upper", "n"},
    # Where the knock-on came from (schema 8): a study's tables; a day's are written, not read back.
    "attribution_sources_stats": {"kind", "train", "place", "section", "damage_mean", "damage_ci95_half_width", "n"},
    "attribution_places_stats": {"place", "received_mean", "received_ci95_half_width", "caused_mean",
                                 "caused_ci95_half_width"},
    "attribution_through_stats": {"kind", "index", "leader", "follower", "knock_on_mean", "knock_on_ci95_half_width"},
    "attribution_causes_stats": {"cause", "knock_on_mean", "knock_on_ci95_half_width"},
}

# Fields where the layout stores NaN for "does not apply / did not happen".
NAN_FIELDS = {
    "timing": {"scheduled_arrival", "scheduled_departure", "arrival", "departure", "arrival_delay",
               "departure_delay"},
    "occupancy": {"locked", "head_enters", "head_leaves", "tail_clears", "released"},
    "holds": {"to"},
    "trajectories": {"chainage"},
    "timing_points": {"delay_mean", "delay_ci95_half_width", "p50", "p90", "p95", "max"},   # + punctual_*
    "differences": {"ci95_half_width", "ci95_lower", "ci95_upper"},
    "attribution_sources_stats": {"train", "section"},
    "attribution_through_stats": {"leader", "follower"},
}

# Integer fields that index another table or count days: their largest value is out of range.
INDEX_OR_BOUNDED = {"train", "section", "leader", "follower", "stops", "deadlocked", "reached", "n", "events",
                    "block_passages", "headway_pairs"}

# Attributes the reader needs, per group, and whether text must be non-empty.
ROOT_NEEDED = ["schema_version", "kind", "program", "program_version", "scenario_file", "command_line", "seed"]
DAY_NEEDED = ["events", "block_passages", "deadlocked", "last_event_time"]
STUDY_NEEDED = ["replications", "deadlocked_days", "knock_on_ratio", "thresholds_s", "partial"]
# Numeric attributes that may be negative (a time before midnight).
SIGNED_ATTRIBUTES = {"last_event_time"}


def table_role(path):
    """The READ_FIELDS key of a table path: study 'trains' and 'sections' are statistics tables."""
    parts = path.split("/")
    name = parts[-1]
    parent = parts[-2] if len(parts) >= 2 else ""
    if name in ("trains", "sections") and (parent == "study" or path.startswith("variants/")):
        return name + "_stats"
    if name.startswith("attribution_"):
        # A study's (or a variant's) are read back; a day's are not.
        return name + "_stats" if (parent == "study" or path.startswith("variants/")) else name
    return name


def field_read(role, field):
    if role not in READ_FIELDS:
        return False
    fields = READ_FIELDS[role]
    if fields is None or field in fields:
        return True
    return role == "timing_points" and field.startswith("punctual_")


def nan_allowed(role, field):
    return field in NAN_FIELDS.get(role, set()) or (role == "timing_points" and field.startswith("punctual_"))


# ---- writing the cases --------------------------------------------------------------------------

class Cases:
    def __init__(self, out_dir):
        self.out_dir = out_dir
        self.lines = []

    def make(self, good, tag, expect, what, change):
        # Numbered names: a report names its file, and "nan" or "inf" in a name would read as a value.
        name = f"case-{len(self.lines):04d}.h5"
        path = os.path.join(self.out_dir, name)
        shutil.copyfile(good, path)
        with h5py.File(path, "r+") as f:
            if change(f) is False:   # not applicable to this file
                os.remove(path)
                return
        self.lines.append(f"{name}\t{expect}\t{tag}: {what}")

    def write_manifest(self):
        with open(os.path.join(self.out_dir, "manifest.tsv"), "w") as m:
            m.write("\n".join(self.lines) + "\n")


def replace_dataset(f, path, data, maxshape=(None,)):
    """Writes `data` in place of the dataset at `path`, keeping its attributes."""
    attrs = dict(f[path].attrs)
    del f[path]
    d = f.create_dataset(path, data=data, maxshape=maxshape, chunks=True if maxshape else None)
    for k, v in attrs.items():
        d.attrs[k] = v


def set_value(path, field, value, row=0):
    def change(f):
        d = f[path]
        if d.shape[0] <= row:
            return False
        a = d[:]
        a[field][row] = value
        d[...] = a
    return change


def first_reached(f, path):
    """The first timing point some day got to: its figures must not be NaN."""
    reached = f[path]["reached"]
    return next((i for i, n in enumerate(reached) if n > 0), None)


def drop_field(path, field):
    def change(f):
        a = f[path][:]
        keep = [n for n in a.dtype.names if n != field]
        replace_dataset(f, path, a[keep].copy() if len(a) else np.zeros(0, dtype=a.dtype[keep]))
    return change


def field_as_text(path, field):
    def change(f):
        a = f[path][:]
        dt = [(n, "S8" if n == field else a.dtype[n]) for n in a.dtype.names]
        b = np.zeros(len(a), dtype=dt)
        for n in a.dtype.names:
            b[n] = a[n] if n != field else b"x"
        replace_dataset(f, path, b)
    return change


def set_attr(path, name, value):
    def change(f):
        f[path].attrs[name] = value
    return change


def del_attr(path, name):
    def change(f):
        if name not in f[path].attrs:
            return False
        del f[path].attrs[name]
    return change


def tables(f, under=""):
    out = []
    f.visititems(lambda n, o: out.append(n) if isinstance(o, h5py.Dataset) else None)
    return [t for t in out if t.startswith(under)]


def value_cases(cases, good, kind, paths):
    with h5py.File(good, "r") as f:
        layout = {p: (f[p].dtype, f[p].shape[0]) for p in paths}
        reached_row = {p: first_reached(f, p) for p in paths if table_role(p) == "timing_points"}
    for p, (dtype, rows) in layout.items():
        role = table_role(p)
        if rows == 0:
            continue
        unread_done = False
        # Kinds of change that take one path for every field of a table: on its first field only.
        first_number = first_float = True
        for field in dtype.names:
            t = dtype[field]
            read = field_read(role, field)
            tag = f"{kind}-{p.replace('/', '.')}-{field}"
            if not read:
                # One case per table for the fields nobody reads: they all take the same path.
                if t.kind == "f" and not unread_done:
                    cases.make(good, tag + "-inf", "any", f"{p}: {field} (not read) = inf", set_value(p, field, np.inf))
                    unread_done = True
                continue
            if t.kind == "f":
                cases.make(good, tag + "-nan", "any" if nan_allowed(role, field) else "refuse",
                           f"{p}: {field} = NaN", set_value(p, field, np.nan))
                if nan_allowed(role, field) and reached_row.get(p) is not None:
                    cases.make(good, tag + "-nan-reached", "refuse", f"{p}: {field} = NaN where reached",
                               set_value(p, field, np.nan, reached_row[p]))
                cases.make(good, tag + "-inf", "refuse", f"{p}: {field} = inf", set_value(p, field, np.inf))
                if first_float:
                    cases.make(good, tag + "-huge", "refuse", f"{p}: {field} = -1e300", set_value(p, field, -1e300))
                    # At the edge of what a time or duration may be (10^9 s): a report must still cope.
                    cases.make(good, tag + "-edge", "any", f"{p}: {field} = 9.9e8", set_value(p, field, 9.9e8))
                    first_float = False
            elif t.kind in "ui":
                expect = "refuse" if field in INDEX_OR_BOUNDED else "any"
                cases.make(good, tag + "-max", expect, f"{p}: {field} = largest {t}",
                           set_value(p, field, np.iinfo(t).max))
            elif t.kind == "S":
                cases.make(good, tag + "-empty", "any", f"{p}: {field} = ''", set_value(p, field, b""))
            cases.make(good, tag + "-missing", "refuse", f"{p}: field {field} dropped", drop_field(p, field))
            if t.kind in "fui" and first_number:
                cases.make(good, tag + "-text", "refuse", f"{p}: field {field} made text", field_as_text(p, field))
                first_number = False


def structure_cases(cases, good, kind, paths):
    for p in paths:
        role = table_role(p)
        read = role in READ_FIELDS
        tag = f"{kind}-{p.replace('/', '.')}"
        expect = "refuse" if read else "any"
        cases.make(good, tag + "-deleted", expect, f"{p} deleted", lambda f, p=p: f.__delitem__(p))
        cases.make(good, tag + "-group", expect, f"{p} replaced by a group",
                   lambda f, p=p: (f.__delitem__(p), f.create_group(p)))
        # 3*10^8 records declared, a few stored: the reader must not allocate for them.
        cases.make(good, tag + "-huge-rows", expect, f"{p} declares 3e8 records",
                   lambda f, p=p: f[p].resize((300_000_000,)))
        cases.make(good, tag + "-2d", expect, f"{p} made 2-D",
                   lambda f, p=p: replace_dataset(f, p, np.stack([f[p][:], f[p][:]]), maxshape=None))
        cases.make(good, tag + "-scalar", expect, f"{p} made a scalar",
                   lambda f, p=p: replace_dataset(f, p, np.float64(1.0), maxshape=None))


def attribute_cases(cases, good, kind, group, needed):
    tag = f"{kind}-{group.strip('/').replace('/', '.') or 'root'}"
    with h5py.File(good, "r") as f:
        present = dict(f[group].attrs)
    for name in needed:
        if name not in present:
            continue
        v = present[name]
        cases.make(good, f"{tag}-{name}-deleted", "refuse", f"{group}: attribute {name} deleted", del_attr(group, name))
        if isinstance(v, (bytes, str, np.bytes_)):
            cases.make(good, f"{tag}-{name}-empty", "refuse", f"{group}: attribute {name} = ''",
                       set_attr(group, name, ""))
            cases.make(good, f"{tag}-{name}-number", "refuse", f"{group}: attribute {name} = 7",
                       set_attr(group, name, 7))
        else:
            cases.make(good, f"{tag}-{name}-text", "refuse", f"{group}: attribute {name} = 'x'",
                       set_attr(group, name, "x"))
            for label, bad in (("nan", np.nan), ("inf", np.inf), ("negative", -1), ("huge", 1e300)):
                if name == "thresholds_s":
                    bad = np.array([bad])
                expect = "any" if label == "negative" and name in SIGNED_ATTRIBUTES else "refuse"
                cases.make(good, f"{tag}-{name}-{label}", expect, f"{group}: attribute {name} = {bad}",
                           set_attr(group, name, bad))


def study_group_cases(cases, good, kind, g):
    tag = f"{kind}-{g.strip('/').replace('/', '.')}"
    for label, value in (("none", np.zeros(0)), ("descending", np.array([300.0, 180.0])),
                         ("twice", np.array([180.0, 180.0])),
                         ("same-name", np.array([180.0000001, 180.0000002])),
                         ("too-large", np.array([180.0, 1e7])), ("zero", np.array([0.0, 300.0]))):
        cases.make(good, f"{tag}-thresholds-{label}", "refuse", f"{g}: thresholds_s = {value.tolist()}",
                   set_attr(g, "thresholds_s", value))
    cases.make(good, f"{tag}-replications-zero", "refuse", f"{g}: replications = 0",
               set_attr(g, "replications", np.uint32(0)))
    cases.make(good, f"{tag}-deadlocked-days-above", "refuse", f"{g}: deadlocked_days above replications",
               lambda f: f[g].attrs.__setitem__("deadlocked_days", np.uint32(f[g].attrs["replications"] + 1)))
    cases.make(good, f"{tag}-per-day-short", "refuse", f"{g}/per_day: fewer records than days",
               lambda f: replace_dataset(f, g + "/per_day", f[g + "/per_day"][:1]))
    cases.make(good, f"{tag}-empty-id", "refuse", f"{g}/trains_index: an empty id",
               set_value(g + "/trains_index", "id", b""))


def day_cases(cases, good):
    paths = [p for p in tables(h5py.File(good, "r")) if p.startswith("day/")]
    value_cases(cases, good, "day", paths)
    structure_cases(cases, good, "day", paths)
    attribute_cases(cases, good, "day", "/", ROOT_NEEDED)
    attribute_cases(cases, good, "day", "/day", DAY_NEEDED)
    for label, value, expect in (("schema-newer", np.int32(99), "refuse"), ("schema-older", np.int32(1), "refuse"),
                                 ("schema-float", np.float64(3.0), "refuse"),
                                 ("schema-negative", np.int32(-3), "refuse")):
        cases.make(good, f"day-root-{label}", expect, f"/: schema_version = {value!r}",
                   set_attr("/", "schema_version", value))
    cases.make(good, "day-root-kind-other", "refuse", "/: kind = 'other'", set_attr("/", "kind", np.bytes_(b"other")))
    cases.make(good, "day-root-program-other", "refuse", "/: program = 'other'",
               set_attr("/", "program", np.bytes_(b"other")))
    cases.make(good, "day-root-seed-largest", "any", "/: seed = 2^64 - 1",
               set_attr("/", "seed", np.uint64(2**64 - 1)))
    for label, value in (("tiny", 1e-9), ("huge", 1e300), ("nan", np.nan), ("negative", -2.0)):
        cases.make(good, f"day-root-step-{label}", "refuse", f"/: step_m = {value}", set_attr("/", "step_m", value))
    cases.make(good, "day-root-text-variable-length", "any", "/: text attributes of variable length",
               lambda f: [f.attrs.__setitem__(k, str(f.attrs[k].decode() if isinstance(f.attrs[k], bytes)
                                                       else f.attrs[k]))
                          for k in ("kind", "program", "program_version", "scenario_file", "command_line")])


def study_cases(cases, good):
    f = h5py.File(good, "r")
    paths = tables(f, "study/")
    traced = sorted(f["replications"].keys())
    f.close()
    value_cases(cases, good, "study", paths)
    structure_cases(cases, good, "study", paths)
    attribute_cases(cases, good, "study", "/", ROOT_NEEDED + ["replications", "partial"])
    attribute_cases(cases, good, "study", "/study", STUDY_NEEDED)
    study_group_cases(cases, good, "study", "/study")
    cases.make(good, "study-root-replications-differ", "refuse", "/: replications differs from /study",
               lambda f: f.attrs.__setitem__("replications", np.uint32(f.attrs["replications"] + 1)))
    cases.make(good, "study-replications-traces-deleted", "refuse", "/replications: traces deleted",
               del_attr("/replications", "traces"))
    cases.make(good, "study-replications-bad-name", "refuse", "/replications/abc",
               lambda f: f.create_group("replications/abc"))
    cases.make(good, "study-replications-beyond", "refuse", "/replications/999999 beyond the days",
               lambda f: f.create_group("replications/999999"))
    # A traced day is read only when it is the one drawn: a defect there may go unnoticed.
    for k in traced:
        for table in ("timing", "trains"):
            p = f"replications/{k}/{table}"
            cases.make(good, f"study-traced-{k}-{table}-deleted", "any", f"{p} deleted", lambda f, p=p: f.__delitem__(p))
            cases.make(good, f"study-traced-{k}-{table}-huge-rows", "any", f"{p} declares 3e8 records",
                       lambda f, p=p: f[p].resize((300_000_000,)))
        cases.make(good, f"study-traced-{k}-events-text", "any", f"/replications/{k}: events = 'x'",
                   set_attr(f"/replications/{k}", "events", "x"))


def comparison_cases(cases, good):
    f = h5py.File(good, "r")
    paths = tables(f, "comparison/")
    first = sorted(f["variants"].keys())[0]
    f.close()
    value_cases(cases, good, "comparison", paths)
    structure_cases(cases, good, "comparison", paths)
    attribute_cases(cases, good, "comparison", "/", ROOT_NEEDED + ["replications"])
    # A variant's group is laid out as /study and read by the same code: its study-level checks only.
    study_group_cases(cases, good, "comparison", f"/variants/{first}")
    cases.make(good, "comparison-variant-twice", "refuse", "/comparison/variants: a name twice",
               lambda f: set_value("comparison/variants", "name", f["comparison/variants"][1]["name"])(f))
    cases.make(good, "comparison-variant-path", "refuse", "/comparison/variants: a name with '/'",
               set_value("comparison/variants", "name", b"base/../x"))
    cases.make(good, "comparison-one-variant", "refuse", "/comparison/variants: one variant only",
               lambda f: replace_dataset(f, "comparison/variants", f["comparison/variants"][:1]))
    cases.make(good, "comparison-variant-group-missing", "refuse", f"/variants/{first} deleted",
               lambda f: f.__delitem__(f"variants/{first}"))
    cases.make(good, "comparison-thresholds-differ", "refuse", "variants with different thresholds",
               lambda f: [f[f"variants/{v}"].attrs.__setitem__("thresholds_s", np.array([120.0, 300.0]))
                          for v in sorted(f["variants"].keys())[1:]])


def main():
    makers = {"day": day_cases, "study": study_cases, "comparison": comparison_cases}
    if len(sys.argv) < 3 or any(k not in makers for k in sys.argv[3:]):
        sys.exit(__doc__)
    good_dir, out_dir = sys.argv[1], sys.argv[2]
    os.makedirs(out_dir, exist_ok=True)
    cases = Cases(out_dir)
    for kind in sys.argv[3:] or list(makers):
        makers[kind](cases, os.path.join(good_dir, kind + ".h5"))
    cases.write_manifest()
    print(f"{len(cases.lines)} files written to {out_dir}")


if __name__ == "__main__":
    main()
