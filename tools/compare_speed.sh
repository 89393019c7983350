#!/bin/bash
# Compares the speed of two builds of knockon_benchmark on the demo, for speed work on the engine.
#   tools/compare_speed.sh OLD_BENCHMARK NEW_BENCHMARK [ROUNDS]
# On a shared 2-core machine the speed swings by 20 % from minute to minute and one core may run
# a quarter slower than the other, so runs one after the other mislead.  Here the two builds run
# at the same time, one pinned to each core (single-threaded), then with the cores swapped; the
# geometric mean of the new/old ratios cancels both the minute's and the core's speed.  Needs
# taskset (util-linux).  Prints each pair and the mean ratio (above 1: the new build is faster).
set -euo pipefail
if [ $# -lt 2 ]; then
  echo "usage: $0 OLD_BENCHMARK NEW_BENCHMARK [ROUNDS]" >&2
  exit 2
fi
old=$(realpath "$1"); new=$(realpath "$2"); rounds=${3:-3}
scenario=$(realpath "$(dirname "$0")/../scenarios/demo.yaml")
scratch=$(mktemp -d)
trap 'rm -rf "$scratch"' EXIT
rate() {   # rate CORE BINARY: block passages per CPU-second of a single-thread study
  # One round (builds from before --rounds refuse the option: run those without it).
  local out
  out=$(taskset -c "$1" "$2" "$scenario" --replications 150 --threads 1 --rounds 1 2>/dev/null) ||
    out=$(taskset -c "$1" "$2" "$scenario" --replications 150 --threads 1)
  awk '/^1 thread /{print $7; exit}' <<< "$out"
}
ratios=()
for _ in $(seq "$rounds"); do
  for cores in "0 1" "1 0"; do
    set -- $cores
    rate "$1" "$old" > "$scratch/old" & rate "$2" "$new" > "$scratch/new" & wait
    a=$(cat "$scratch/old"); b=$(cat "$scratch/new")
    echo "old (core $1) $a   new (core $2) $b block passages per CPU-second"
    ratios+=("$a:$b")
  done
done
printf '%s\n' "${ratios[@]}" | awk -F: '{ s += log($2 / $1); n++ } END { printf "new / old: %.3f (geometric mean of %d pairs)\n", exp(s / n), n }'
