#!/bin/bash
# Runs two builds of knockon on the demo (a study with traced days, a three-variant comparison,
# one day, the plan) and reports any difference in their results.  For changes meant to leave
# results alone (speed work, refactoring): "same" everywhere, or the differences to explain.
#   tools/same_results.sh OLD_KNOCKON NEW_KNOCKON [SCRATCH_DIR]
# Files are compared with h5diff (package hdf5-tools) and cmp; the run's command lines are the
# same in both, so only results can differ.  Exit status 0 when all agree, 1 otherwise.
set -euo pipefail
if [ $# -lt 2 ]; then
  echo "usage: $0 OLD_KNOCKON NEW_KNOCKON [SCRATCH_DIR]" >&2
  exit 2
fi
old=$(realpath "$1"); new=$(realpath "$2")
scratch=${3:-$(mktemp -d)}
scenario=$(realpath "$(dirname "$0")/../scenarios/demo.yaml")
command -v h5diff >/dev/null || { echo "$0: h5diff not found (apt-get install hdf5-tools)" >&2; exit 2; }

run() {   # run BINARY DIR
  mkdir -p "$2" && cd "$2" && cp "$scenario" demo.yaml
  "$1" simulate demo.yaml --replications 100 --threads 2 --traces sample:10 --out study.h5 > study.txt 2>&1
  "$1" compare demo.yaml --variants base,four_aspect,shorter_blocks --replications 40 --threads 2 \
      --out compare.h5 > compare.txt 2>&1
  "$1" simulate demo.yaml --seed 7 --out day.h5 > day.txt 2>&1
  "$1" plan demo.yaml > plan.txt
}
(run "$old" "$scratch/old")
(run "$new" "$scratch/new")

status=0
for f in study compare day; do
  if h5diff -c "$scratch/old/$f.h5" "$scratch/new/$f.h5" > "$scratch/$f.h5diff" 2>&1; then
    echo "$f.h5: same"
  else
    echo "$f.h5: DIFFERS (see $scratch/$f.h5diff)"
    status=1
  fi
done
for f in study compare day plan; do
  if cmp -s "$scratch/old/$f.txt" "$scratch/new/$f.txt"; then
    echo "$f.txt: same"
  else
    echo "$f.txt: DIFFERS"
    status=1
  fi
done
exit $status
