#!/usr/bin/env bash
# CI: the whole test suite again, built under AddressSanitizer and UndefinedBehaviorSanitizer
# (tools/sanitized_build.sh: every report fatal), but for the browser tests (they check pages in
# Chromium, not the program's memory) and the benchmark's smoke run (a speed measurement).
set -euo pipefail
cd "$(dirname "$0")/.."
tools/sanitized_build.sh knockon knockon_tests
export ASAN_OPTIONS="detect_leaks=1:strict_string_checks=1:detect_stack_use_after_return=1"
export UBSAN_OPTIONS="print_stacktrace=1"
ctest --test-dir build-asan --no-tests=error --output-on-failure -j"$(nproc)" -LE browser -E '^benchmark\.smoke$'
