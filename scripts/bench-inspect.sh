#!/usr/bin/env bash
# Compares `recoil inspect` (release build) with `wc -l` on the same
# generated LHEF 3.0 file, plain and gzip-compressed.
#
# Usage: scripts/bench-inspect.sh [N_EVENTS]   (default 1000000, ~1.4 GB)
# The file is written to a temporary folder and removed afterwards.
set -euo pipefail
n_events="${1:-1000000}"
cd "$(dirname "$0")/.."
cargo build --release --quiet --bin recoil --example make-bench-events
target_dir="${CARGO_TARGET_DIR:-target}"
tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
file="$tmp/bench.lhe"
"$target_dir/release/examples/make-bench-events" "$file" "$n_events"
bytes=$(stat -c %s "$file")

best() { # best wall time of 3 runs of "$@" [s]
    local best=""
    for _ in 1 2 3; do
        local t0 t1 dt
        t0=$(date +%s.%N)
        "$@" > /dev/null
        t1=$(date +%s.%N)
        dt=$(echo "$t1 - $t0" | bc -l)
        if [ -z "$best" ] || [ "$(echo "$dt < $best" | bc -l)" = 1 ]; then best=$dt; fi
    done
    echo "$best"
}

t_wc=$(best wc -l "$file")
t_inspect=$(best "$target_dir/release/recoil" inspect "$file")
t_inspect1=$(RAYON_NUM_THREADS=1 best "$target_dir/release/recoil" inspect "$file")
gzip -1 -k "$file"
t_gunzip=$(best gzip -dc "$file.gz")
t_inspect_gz=$(best "$target_dir/release/recoil" inspect "$file.gz")

gbs() { echo "scale=3; $bytes / $1 / 1000000000" | bc -l; }
echo "file: $n_events events, $bytes bytes ($(nproc) cores)"
printf '%-34s %8s s  %6s GB/s\n' "wc -l" "$t_wc" "$(gbs "$t_wc")"
printf '%-34s %8s s  %6s GB/s\n' "recoil inspect (all threads)" "$t_inspect" "$(gbs "$t_inspect")"
printf '%-34s %8s s  %6s GB/s\n' "recoil inspect (1 thread)" "$t_inspect1" "$(gbs "$t_inspect1")"
printf '%-34s %8s s  %6s GB/s\n' "gzip -dc (system gzip)" "$t_gunzip" "$(gbs "$t_gunzip")"
printf '%-34s %8s s  %6s GB/s\n' "recoil inspect on .gz" "$t_inspect_gz" "$(gbs "$t_inspect_gz")"
echo "inspect / wc -l = $(echo "scale=2; $t_inspect / $t_wc" | bc -l)"
