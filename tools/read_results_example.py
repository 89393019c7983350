#!/usr/bin/env python3
"""Read a knockon HDF5 results file (layout: tools/io/HDF5_LAYOUT.md).

    python3 tools/read_results_example.py results.h5

Needs h5py and NumPy; uses pandas for DataFrames when it is installed, plain NumPy record arrays
otherwise. Each table under /day is one compound dataset: `f["/day/timing"][:]` gives a NumPy
structured array in one read, which pandas takes as it is.
"""
import sys

import h5py
import numpy as np

try:
    import pandas as pd
except ImportError:  # optional
    pd = None

TABLES = ("trains", "sections", "timing", "occupancy", "routes", "holds", "trajectories")


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


def load_day(path):
    """Root facts, /day facts, units and every /day table.

    Tables are DataFrames when pandas is installed (with train_id / section_id columns added),
    otherwise NumPy structured arrays; there, ids come from trains["id"][timing["train"]].
    """
    with h5py.File(path, "r") as f:
        day = f["day"]
        tables = {name: decode_text_fields(day[name][:]) for name in TABLES}
        facts = {k: attr_value(v) for k, v in f.attrs.items()}
        day_facts = {k: attr_value(v) for k, v in day.attrs.items()}
        units = {name: attr_value(day[name].attrs["units"]) for name in TABLES}
    if pd is None:
        return facts, day_facts, units, tables
    train_ids = tables["trains"]["id"]
    section_ids = tables["sections"]["id"]
    frames = {name: pd.DataFrame.from_records(rec, columns=rec.dtype.names) for name, rec in tables.items()}
    for name, frame in frames.items():
        if name not in ("trains", "sections"):
            frame["train_id"] = train_ids[frame["train"].to_numpy()]
    frames["occupancy"]["section_id"] = section_ids[frames["occupancy"]["section"].to_numpy()]
    return facts, day_facts, units, frames


def main(argv):
    if len(argv) != 2:
        print("usage: python3 tools/read_results_example.py RESULTS.h5", file=sys.stderr)
        return 2
    try:
        facts, day_facts, units, tables = load_day(argv[1])
    except (OSError, KeyError, IndexError, ValueError) as e:
        print(f"{argv[1]}: cannot read knockon results: {e}", file=sys.stderr)
        return 1

    print(f"{argv[1]}: {facts.get('program')} {facts.get('program_version')}, "
          f"schema {facts.get('schema_version')}, scenario '{facts.get('scenario_name')}', seed {facts.get('seed')}")
    print(f"caution: {facts.get('caution')}")
    print(f"day: {day_facts.get('events')} events, {day_facts.get('block_passages')} block passages, "
          f"deadlocked={bool(day_facts.get('deadlocked'))}")
    for name in TABLES:
        table = tables[name]
        print(f"\n{name}: {len(table)} records  [{units[name]}]")
        if len(table):
            print(table.head(5).to_string(index=False) if pd is not None else table[:5])

    timing = tables["timing"]
    if len(timing):
        # NaN marks times that did not happen; NumPy's nanmax skips them.
        delays = np.asarray(timing["arrival_delay"], dtype=float)
        if np.any(~np.isnan(delays)):
            print(f"\nlargest arrival delay: {np.nanmax(delays):.1f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
