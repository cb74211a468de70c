#!/usr/bin/env bash
# Times `recoil recast` (release build) with the demo search against `wc -l`
# on the same LHEF file, in the same run. Goal: recast ≤ 4 × wc -l on 2 cores.
#
# usage: scripts/bench-recast.sh [FILE.lhe] [N_EVENTS] [REPEATS]
#   FILE.lhe   an existing LHEF file; generated (synthetic, timing only) when
#              absent (examples/make-bench-events: LHEF 3.0, nine named
#              weights), with N_EVENTS events (default 200000)
#   REPEATS    timed runs of each command (default 3); the best time counts
# Environment: DETECTOR (profile TOML, default recasts/detectors/generic-13tev.toml),
#              THREADS (default 0 = all cores), CARGO_TARGET_DIR.
set -euo pipefail
cd "$(dirname "$0")/.."

n_events="${2:-200000}"
repeats="${3:-3}"
file="${1:-}"
cargo build --release --quiet --bin recoil --example make-bench-events
bin="${CARGO_TARGET_DIR:-target}/release/recoil"
if [[ -z "$file" ]]; then
    file="${TMPDIR:-/tmp}/recoil-bench-${n_events}.lhe"
    if [[ ! -s "$file" ]]; then
        echo "generating $n_events synthetic events in $file" >&2
        "${CARGO_TARGET_DIR:-target}/release/examples/make-bench-events" "$file" "$n_events"
    fi
fi
detector="${DETECTOR:-recasts/detectors/generic-13tev.toml}"
threads="${THREADS:-0}"

# Warm the page cache so both commands read from memory.
cat "$file" > /dev/null

best() { sort -g | head -n 1; }
TIMEFORMAT=%R
time_wc=$(for _ in $(seq "$repeats"); do
    { time wc -l "$file" > /dev/null; } 2>&1
done | best)
time_recast=$(for _ in $(seq "$repeats"); do
    { time "$bin" recast --search recasts/searches/demo-jet-met.toml \
        --detector "$detector" --threads "$threads" "$file" > /dev/null; } 2>&1
done | best)

size=$(du -h "$file" | cut -f1)
echo "file: $file ($size, $(grep -c '<event>' "$file") events); cores: $(nproc); threads: $threads"
echo "wc -l:         ${time_wc} s (best of $repeats)"
echo "recoil recast: ${time_recast} s (best of $repeats)"
awk -v r="$time_recast" -v w="$time_wc" 'BEGIN { if (w > 0) printf "ratio recast / wc -l: %.2f (goal ≤ 4)\n", r / w }'
