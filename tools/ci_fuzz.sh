#!/usr/bin/env bash
# CI: a short run of each fuzz target (tests/fuzz; FUZZ_SECONDS each, default 60), both at once,
# in the sanitized build (tools/sanitized_build.sh).  A crash, a sanitizer report, a hang (-timeout)
# or an allocation beyond the limit fails the run; the input that did it is kept in build-asan/fuzz/
# and printed.  DEVELOPERS.md, "Fuzzing", says how to run them for hours.
set -euo pipefail
cd "$(dirname "$0")/.."
seconds=${FUZZ_SECONDS:-60}
tools/sanitized_build.sh knockon fuzz_scenario_reader fuzz_results_reader

work=build-asan/fuzz
rm -rf "$work"
mkdir -p "$work/scenario" "$work/results" "$work/base"
# Seeds of the scenario reader: the corpus kept with the target and every scenario of the repository.
cp tests/fuzz/scenario_corpus/* "$work/scenario/"
for f in scenarios/*.yaml $(find tests/data -name '*.yaml'); do
  cp "$f" "$work/scenario/$(echo "$f" | tr / _)"
done
cp tests/fuzz/results_corpus/* "$work/results/"
# The results files the edits of fuzz_results_reader start from, written by the program itself.
k=build-asan/knockon
$k simulate tests/data/study/delayed_line.yaml --sample 60 --delay S-0700:dwell@B:8 --out "$work/base/day.h5" >/dev/null
$k simulate tests/data/study/delayed_line.yaml --replications 20 --traces sample:2 --out "$work/base/study.h5" >/dev/null
$k compare tests/fuzz/scenario_corpus/delayed_line_variants.yaml --variants base,slow_release --replications 10 \
  --out "$work/base/comparison.h5" >/dev/null

export ASAN_OPTIONS="detect_leaks=1"
common=(-max_total_time="$seconds" -timeout=30 -rss_limit_mb=2048 -malloc_limit_mb=1024 -print_final_stats=1)
build-asan/fuzz_scenario_reader "$work/scenario" -dict=tests/fuzz/scenario.dict -max_len=65536 \
  -artifact_prefix="$work/scenario-" "${common[@]}" >"$work/scenario.log" 2>&1 &
scenario_pid=$!
KNOCKON_FUZZ_BASE="$work/base" build-asan/fuzz_results_reader "$work/results" -dict=tests/fuzz/results.dict \
  -max_len=121 -len_control=0 -artifact_prefix="$work/results-" "${common[@]}" >"$work/results.log" 2>&1 &
results_pid=$!

status=0
for target in scenario results; do
  pid_var="${target}_pid"
  if wait "${!pid_var}"; then
    echo "fuzz $target: $(grep -E '^stat::number_of_executed_units' "$work/$target.log" | awk '{print $2}') runs, no finding"
  else
    status=1
    echo "fuzz $target: FINDING"
    tail -n 60 "$work/$target.log"
    for a in "$work/$target-"*; do
      [ -e "$a" ] || continue
      echo "input $a (base64):"
      base64 "$a" | head -c 4000
      echo
    done
  fi
done
exit $status
