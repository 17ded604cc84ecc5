#!/bin/bash
# Whole-process timings for the README's Speed table: for each command, the median wall time
# (ms, from spawning the process to reaping it, no shell in between) and the median CPU time
# (ms, user + system of the child from wait4's rusage, all its threads) of N runs (default 21),
# the commands taken in turn so that a change of machine load hits them alike.
# Usage: benches/whole-process.sh [BIN] [N]   (from the repository root; BIN defaults to
# target/release/eddyzone). Wall times suffer when the machine is shared; CPU times less so.
set -u
BIN=$(realpath "${1:-target/release/eddyzone}")
N=${2:-21}
cd "$(dirname "$0")/.." || exit 2
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
python3 - "$BIN" "$N" "$tmp" <<'PY'
import os, statistics, subprocess, sys, time
binary, runs, tmp = sys.argv[1], int(sys.argv[2]), sys.argv[3]
commands = [
    ("--version", ["--version"]),
    ("run small case", ["run", "benches/data/small-coaster.yaml"]),
    ("heat tower demo", ["heat", "scenarios/tower-catch-brake.yaml"]),
    ("check tower demo", ["check", "scenarios/tower-catch-brake.yaml"]),
    ("plan coaster plan demo", ["plan", "scenarios/coaster-plan.yaml"]),
    ("report coaster demo",
     ["report", "scenarios/coaster-brake-run.yaml", "--out", f"{tmp}/report", "--force"]),
]
times = {label: ([], []) for label, _ in commands}
for _ in range(runs):
    for label, args in commands:
        start = time.perf_counter()
        child = subprocess.Popen([binary] + args, stdout=subprocess.DEVNULL,
                                 stderr=subprocess.DEVNULL)
        _, _, usage = os.wait4(child.pid, 0)
        wall_ms = (time.perf_counter() - start) * 1e3
        times[label][0].append(wall_ms)
        times[label][1].append((usage.ru_utime + usage.ru_stime) * 1e3)
for label, _ in commands:
    wall, cpu = times[label]
    print(f"{label:26s} wall {statistics.median(wall):8.2f} ms   cpu {statistics.median(cpu):8.2f} ms")
PY
