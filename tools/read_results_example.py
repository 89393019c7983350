#!/usr/bin/env python3
"""Read a knockon HDF5 results file (layout: tools/results/HDF5_LAYOUT.md): one simulated day
(root attribute kind = "day"), a Monte Carlo study (kind = "study") or a comparison of variants
(kind = "comparison").

    python3 tools/read_results_example.py results.h5

Needs h5py and NumPy; uses pandas for DataFrames when it is installed, plain NumPy record arrays
otherwise. Each table is one compound dataset: `f["/day/timing"][:]` or `f["/study/per_day"][:]`
gives a NumPy structured array in one read, which pandas takes as it is.
"""
import sys

import h5py
import numpy as np

try:
    import pandas as pd
except ImportError:  # optional
    pd = None

TABLES = ("trains", "sections", "timing", "occupancy", "routes", "holds", "trajectories")
# Schema 4 and later: the trains a deadlocked day left waiting (empty when the day ran to the end).
DEADLOCK_TABLES = ("deadlock", "deadlock_blocks")
STUDY_TABLES = ("per_day", "summary", "timing_points", "trains", "signals", "sections", "trains_index",
                "sections_index")


def decode_text_fields(records):
    """Turn the fixed-length byte-string fields ('S<n>') of a structured array into str ('U<n>')."""
    fields = []
    for name in records.dtype.names:
        kind = records.dtype[name]
        fields.append((name, kind.str.replace("S", "U") if kind.kind == "S" else kind))
    out = np.empty(records.shape, dtype=fields)
    for name in records.dtype.names:
        column = records[name]
        out[name] = np.char.decode(column, "utf-8") if column.dtype.kind == "S" else column
    return out


def attr_value(value):
    """Attribute as a plain Python value: text as str, NumPy scalars as int/float."""
    if isinstance(value, (bytes, np.bytes_)):
        return value.decode("utf-8")
    return value.item() if isinstance(value, np.generic) else value


def file_kind(path):
    """"day", "study" or "comparison" (files written before the kind attribute existed hold one day)."""
    with h5py.File(path, "r") as f:
        return attr_value(f.attrs.get("kind", b"day"))


def load_day(path, group="day"):
    """Root facts, the day group's facts, units and every table of that group.

    `group` is "day" in a day file, "replications/000042" for a traced day of a study file.
    Tables are DataFrames when pandas is installed (with train_id / section_id columns added),
    otherwise NumPy structured arrays; there, ids come from trains["id"][timing["train"]].
    """
    with h5py.File(path, "r") as f:
        day = f[group]
        names = TABLES + tuple(name for name in DEADLOCK_TABLES if name in day)
        tables = {name: decode_text_fields(day[name][:]) for name in names}
        facts = {k: attr_value(v) for k, v in f.attrs.items()}
        day_facts = {k: attr_value(v) for k, v in day.attrs.items()}
        units = {name: attr_value(day[name].attrs["units"]) for name in names}
    if pd is None:
        return facts, day_facts, units, tables
    train_ids = tables["trains"]["id"]
    section_ids = tables["sections"]["id"]
    frames = {name: pd.DataFrame.from_records(rec, columns=rec.dtype.names) for name, rec in tables.items()}
    for name, frame in frames.items():
        if name not in ("trains", "sections"):
            frame["train_id"] = train_ids[frame["train"].to_numpy()]
    for name in ("occupancy", "deadlock_blocks"):
        if name in frames:
            frames[name]["section_id"] = section_ids[frames[name]["section"].to_numpy()]
    return facts, day_facts, units, frames


def load_study(path):
    """Root facts, /study facts (thresholds_s as a list), units, every /study table, and the names
    of the traced days under /replications (each readable with load_day(path, "replications/" + name)).

    Tables are DataFrames when pandas is installed (with train_id / section_id columns added where
    a table refers to trains_index / sections_index), otherwise NumPy structured arrays.
    """
    with h5py.File(path, "r") as f:
        study = f["study"]
        tables = {name: decode_text_fields(study[name][:]) for name in STUDY_TABLES}
        facts = {k: attr_value(v) for k, v in f.attrs.items()}
        study_facts = {k: attr_value(v) for k, v in study.attrs.items()}
        study_facts["thresholds_s"] = [float(x) for x in np.atleast_1d(study.attrs["thresholds_s"])]
        units = {name: attr_value(study[name].attrs["units"]) for name in STUDY_TABLES}
        traced = sorted(f["replications"].keys())
    if pd is None:
        return facts, study_facts, units, tables, traced
    train_ids = tables["trains_index"]["id"]
    section_ids = tables["sections_index"]["id"]
    frames = {name: pd.DataFrame.from_records(rec, columns=rec.dtype.names) for name, rec in tables.items()}
    for name in ("timing_points", "trains"):
        frames[name]["train_id"] = train_ids[frames[name]["train"].to_numpy()]
    frames["sections"]["section_id"] = section_ids[frames["sections"]["section"].to_numpy()]
    return facts, study_facts, units, frames, traced


def load_comparison(path):
    """Root facts, /comparison facts, the variants (in order) and the paired differences, and per
    variant its study tables (laid out like /study), as DataFrames or NumPy structured arrays."""
    with h5py.File(path, "r") as f:
        facts = {k: attr_value(v) for k, v in f.attrs.items()}
        comparison = f["comparison"]
        comparison_facts = {k: attr_value(v) for k, v in comparison.attrs.items()}
        variants = decode_text_fields(comparison["variants"][:])
        differences = decode_text_fields(comparison["differences"][:])
        studies = {}
        for name in variants["name"]:
            group = f["variants"][name]
            studies[name] = {table: decode_text_fields(group[table][:]) for table in STUDY_TABLES}
    if pd is not None:
        variants = pd.DataFrame.from_records(variants, columns=variants.dtype.names)
        differences = pd.DataFrame.from_records(differences, columns=differences.dtype.names)
        studies = {name: {t: pd.DataFrame.from_records(r, columns=r.dtype.names) for t, r in tables.items()}
                   for name, tables in studies.items()}
    return facts, comparison_facts, variants, differences, studies


def main_comparison(path):
    facts, comparison_facts, variants, differences, studies = load_comparison(path)
    print(f"{path}: {facts.get('program')} {facts.get('program_version')}, schema {facts.get('schema_version')}, "
          f"comparison of scenario '{facts.get('scenario_name')}', seed {facts.get('seed')}, "
          f"{facts.get('replications')} days per variant")
    show_deadlock(facts)
    print(f"caution: {facts.get('caution')}")
    print(f"variants: {', '.join(str(n) for n in variants['name'])} "
          f"(differences against {comparison_facts['differences_against']})")
    for name, tables in studies.items():
        print(f"  {name}: per_day {len(tables['per_day'])} records")
    print("\npaired differences (variant minus the first; plan figures have no interval):")
    for i in range(len(differences)):
        row = differences.iloc[i] if pd is not None else differences[i]
        print(f"  {row['variant']} {row['figure']}: {row['mean']:+.4g} {row['unit']} "
              f"[{row['ci95_lower']:.4g}, {row['ci95_upper']:.4g}] (n = {row['n']})")
    return 0


def show_deadlock(facts):
    """Deadlocked days come first (schema 4 and later): the figures leave them out."""
    if facts.get("deadlock_notice"):
        print(facts["deadlock_notice"])


def show(name, table, units):
    print(f"\n{name}: {len(table)} records  [{units}]")
    if len(table):
        print(table.head(5).to_string(index=False) if pd is not None else table[:5])


def main_study(path):
    facts, study_facts, units, tables, traced = load_study(path)
    print(f"{path}: {facts.get('program')} {facts.get('program_version')}, schema {facts.get('schema_version')}, "
          f"study of scenario '{facts.get('scenario_name')}', seed {facts.get('seed')}")
    show_deadlock(facts)
    print(f"caution: {facts.get('caution')}")
    print(f"study: {study_facts['replications']} days{' (PARTIAL)' if study_facts['partial'] else ''}, "
          f"{study_facts['deadlocked_days']} deadlocked, knock-on/primary {study_facts['knock_on_ratio']:.2f}, "
          f"thresholds {study_facts['thresholds_s']} s")
    summary = tables["summary"]
    for i in range(len(summary)):
        row = summary.iloc[i] if pd is not None else summary[i]
        print(f"  {row['figure']}: {row['mean']:.4g} +/- {row['ci95_half_width']:.2g} {row['unit']} (n = {row['n']})")
    for name in STUDY_TABLES:
        show(name, tables[name], units[name])
    print(f"\ntraced days: {len(traced)}" + (f" ({', '.join(traced[:10])}{', ...' if len(traced) > 10 else ''})"
                                            if traced else ""))
    if traced:
        # A traced day reads like the /day group of a day file.
        _, day_facts, _, day_tables = load_day(path, "replications/" + traced[0])
        print(f"day {traced[0]}: {day_facts.get('events')} events, "
              + ", ".join(f"{name} {len(day_tables[name])}" for name in TABLES))
    return 0


def main(argv):
    if len(argv) != 2:
        print("usage: python3 tools/read_results_example.py RESULTS.h5", file=sys.stderr)
        return 2
    try:
        kind = file_kind(argv[1])
        if kind == "study":
            return main_study(argv[1])
        if kind == "comparison":
            return main_comparison(argv[1])
        facts, day_facts, units, tables = load_day(argv[1])
    except (OSError, KeyError, IndexError, ValueError) as e:
        print(f"{argv[1]}: cannot read knockon results: {e}", file=sys.stderr)
        return 1

    print(f"{argv[1]}: {facts.get('program')} {facts.get('program_version')}, "
          f"schema {facts.get('schema_version')}, scenario '{facts.get('scenario_name')}', seed {facts.get('seed')}")
    show_deadlock(facts)
    print(f"caution: {facts.get('caution')}")
    print(f"day: {day_facts.get('events')} events, {day_facts.get('block_passages')} block passages, "
          f"deadlocked={bool(day_facts.get('deadlocked'))}")
    for name in tables:
        show(name, tables[name], units[name])

    timing = tables["timing"]
    if len(timing):
        # NaN marks times that did not happen; NumPy's nanmax skips them.
        delays = np.asarray(timing["arrival_delay"], dtype=float)
        if np.any(~np.isnan(delays)):
            print(f"\nlargest arrival delay: {np.nanmax(delays):.1f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
