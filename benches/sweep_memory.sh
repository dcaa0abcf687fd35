#!/usr/bin/env bash
# Peak memory of sweeps of 10,000 and 100,000 candidates of the fin example
# (GNU time's "Maximum resident set size"), side by side: the streamed sweep
# keeps only its tally, so the two should differ by far less than 50 MB.
# Usage: benches/sweep_memory.sh   (builds the release binary first; the
# 100,000-candidate sweep takes a few minutes on 2 cores)
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release --quiet
bin=target/release/coilwright
tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
run() {
    # $1: label; the rest: --vary arguments
    local label="$1"
    shift
    /usr/bin/time -v "$bin" sweep examples/fin-actuator.toml "$@" \
        --maximize force_per_sqrt_w_n -o "$tmp/$label" >"$tmp/$label.out" 2>"$tmp/$label.time" || true
    local rss count
    rss="$(grep 'Maximum resident set size' "$tmp/$label.time" | awk '{print $NF}')"
    count="$(($(wc -l <"$tmp/$label/candidates.csv") - 1))"
    printf '%-8s %7d candidates  peak RSS %7.1f MB\n' "$label" "$count" "$(awk -v r="$rss" 'BEGIN{print r/1024}')"
}
# 4 x 25 x 10 x 10 = 10,000 and 4 x 25 x 10 x 100 = 100,000 candidates.
run 10k --vary layers=2,4,6,8 --vary turns=6..30 --vary trace_width=0.1mm..0.19mm:0.01mm \
    --vary outer_diameter=12mm..16.5mm:0.5mm
run 100k --vary layers=2,4,6,8 --vary turns=6..30 --vary trace_width=0.1mm..0.19mm:0.01mm \
    --vary outer_diameter=12mm..21.9mm:0.1mm
