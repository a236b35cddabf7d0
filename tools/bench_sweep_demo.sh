#!/usr/bin/env bash
# Whole-process benchmark of `syntrain sweep` on the demo train: cases a second written to CSV
# with every default column, and peak memory, at 10 000, 100 000 and 1 000 000 cases (the cost
# should be linear in cases and the memory flat). Build first: cargo build --release.
# Usage: bash tools/bench_sweep_demo.sh [path/to/syntrain] [output folder, default a temporary one]
set -euo pipefail
root="$(cd "$(dirname "$0")/.." && pwd)"
exe="${1:-$root/target/release/syntrain}"
out_dir="${2:-$(mktemp -d)}"
for n in 10 100 1000; do
    cases=$((n * 1000))
    log="$out_dir/time-$cases.txt"
    /usr/bin/time -f "%e %M" -o "$log" "$exe" sweep "$root/flowsheets/demo-train.yaml" \
        --vary 'units.hts.approach.shift=0 K..40 K:1000' \
        --vary "units.reformer.outlet-temperature=820 degC..900 degC:$n" \
        --output "$out_dir/sweep-$cases.csv" 2>/dev/null
    read -r seconds kb < "$log"
    columns=$(head -n 1 "$out_dir/sweep-$cases.csv" | tr ',' '\n' | wc -l)
    rate=$(awk -v c="$cases" -v s="$seconds" 'BEGIN { printf "%.0f", c / s }')
    echo "$cases cases, $columns columns: $seconds s, $rate cases/s, peak memory $((kb / 1024)) MB"
    rm -f "$out_dir/sweep-$cases.csv"
done
