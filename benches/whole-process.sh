#!/bin/bash
# Whole-process timings for the README's Speed table: the median wall time (ms) and the median
# CPU time (ms, perf stat task-clock) of N runs (default 21) of each command, on the release binary.
# Usage: benches/whole-process.sh [BIN] [N]   (from the repository root; BIN defaults to
# target/release/eddyzone). Wall times suffer when the machine is shared; CPU times less so.
set -u
BIN=$(realpath "${1:-target/release/eddyzone}")
N=${2:-21}
cd "$(dirname "$0")/.." || exit 2
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
median() { sort -n | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}'; }
measure() {
  local label=$1; shift
  : > "$tmp/wall"; : > "$tmp/cpu"
  for _ in $(seq "$N"); do
    local t0 t1
    t0=$(date +%s%N)
    "$@" > /dev/null 2>&1
    t1=$(date +%s%N)
    echo "($t1 - $t0) / 1000000" | bc -l >> "$tmp/wall"
    perf stat -x, -e task-clock -o "$tmp/t" "$@" > /dev/null 2>&1
    grep task-clock "$tmp/t" | cut -d, -f1 >> "$tmp/cpu"
  done
  printf '%-26s wall %8.2f ms   cpu %8.2f ms\n' "$label" "$(median < "$tmp/wall")" "$(median < "$tmp/cpu")"
}
measure "--version" "$BIN" --version
measure "run small case" "$BIN" run benches/data/small-coaster.yaml
measure "heat tower demo" "$BIN" heat scenarios/tower-catch-brake.yaml
measure "check tower demo" "$BIN" check scenarios/tower-catch-brake.yaml
measure "plan coaster plan demo" "$BIN" plan scenarios/coaster-plan.yaml
measure "report coaster demo" "$BIN" report scenarios/coaster-brake-run.yaml --out "$tmp/report" --force
