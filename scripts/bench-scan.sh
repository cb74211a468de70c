#!/usr/bin/env bash
# Wall time of the demo scan: a cold run (no cache), a re-run whose yields
# all come from the cache (the per-point results are removed first, as when
# the statistics options change), and a resumed re-run (nothing to do);
# events per second across the cold run. Release build.
#
# Usage: scripts/bench-scan.sh [PLAN] [THREADS]
#   PLAN     default demo-events/scan.toml
#   THREADS  default: one per core
set -euo pipefail
cd "$(dirname "$0")/.."
plan=${1:-demo-events/scan.toml}
threads=${2:-}
cargo build --release --quiet
bin=${CARGO_TARGET_DIR:-target}/release/recoil
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
args=(scan "$plan" --out "$out/run")
if [ -n "$threads" ]; then args+=(--threads "$threads"); fi

seconds() { # runs the command, prints its wall time in seconds
  local t0 t1
  t0=$(date +%s.%N)
  "$@" > "$out/log" 2>&1
  t1=$(date +%s.%N)
  awk -v a="$t0" -v b="$t1" 'BEGIN { printf "%.3f", b - a }'
}

cold=$(seconds "$bin" "${args[@]}")
summary=$(grep -E 'events read in' "$out/log" || true)
rm -rf "$out/run/points"
cached=$(seconds "$bin" "${args[@]}")
resumed=$(seconds "$bin" "${args[@]}")

echo "plan: $plan   threads: ${threads:-all cores}   cores: $(nproc)"
echo "cold run (events read):        ${cold} s"
echo "  $summary"
echo "re-run, yields from the cache: ${cached} s"
echo "re-run, every point resumed:   ${resumed} s"
