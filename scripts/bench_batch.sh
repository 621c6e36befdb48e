#!/usr/bin/env bash
# Batch speed of the `vhfit` command line: `vhfit fit` on 200 files of 20 points each
# (text summary, JSON, and JSON with one report set per file) and on one file of 10^6 rows
# (JSON streamed, and --summary). The data are generated here, in a temporary folder, from
# an invented exothermic binding (ΔH° = −45 kJ/mol, ΔS° = −60 J/(mol K)) with 2 % noise.
#
# Usage: scripts/bench_batch.sh            (builds the release binary first)
#        BIN=path/to/vhfit scripts/bench_batch.sh
set -euo pipefail
cd "$(dirname "$0")/.."

if [ -z "${BIN:-}" ]; then
    cargo build --release --quiet
    BIN="${CARGO_TARGET_DIR:-target}/release/vhfit"
fi
WORK="$(mktemp -d)"
trap 'rm -rf "$WORK"' EXIT

gen() { # gen FILE ROWS SEED
    awk -v n="$2" -v seed="$3" 'BEGIN {
        srand(seed); R = 8.314462618; dh = -45000; ds = -60;
        print "T (°C),K,sigma_K";
        for (i = 0; i < n; i++) {
            t = 5 + 55 * (n > 1 ? i / (n - 1) : 0);
            k = exp(-dh / (R * (t + 273.15)) + ds / R);
            # Box–Muller normal noise, 2 % of K
            u1 = rand(); if (u1 < 1e-12) u1 = 1e-12; u2 = rand();
            z = sqrt(-2 * log(u1)) * cos(6.283185307179586 * u2);
            printf "%.4f,%.6g,%.3g\n", t, k * (1 + 0.02 * z), 0.02 * k;
        }
    }' > "$1"
}

mkdir -p "$WORK/batch" "$WORK/reports"
for i in $(seq 1 200); do gen "$WORK/batch/set$i.csv" 20 "$i"; done
gen "$WORK/million.csv" 1000000 7
echo "generated: 200 files × 20 rows; one file of $(($(wc -l < "$WORK/million.csv") - 1)) rows ($(du -h "$WORK/million.csv" | cut -f1))"

measure() { # measure LABEL COMMAND...
    local label="$1"; shift
    if [ -x /usr/bin/time ]; then
        /usr/bin/time -f "%e s, max RSS %M KiB" -o "$WORK/time" "$@" > "$WORK/out" 2> "$WORK/err" || true
        printf '%-44s %s\n' "$label" "$(tail -1 "$WORK/time")"
    else
        local s e
        s=$(date +%s.%N); "$@" > "$WORK/out" 2> "$WORK/err" || true; e=$(date +%s.%N)
        printf '%-44s %.2f s\n' "$label" "$(echo "$e - $s" | bc)"
    fi
}

measure "200 files, text summary" "$BIN" fit "$WORK"/batch/*.csv
echo "  summary rows: $(($(wc -l < "$WORK/out") - 1)), exit-code check: $(grep -c . "$WORK/err" || true) stderr lines"
measure "200 files, --json" "$BIN" fit "$WORK"/batch/*.csv --json
measure "10^6 rows, --json (points streamed)" "$BIN" fit "$WORK/million.csv" --json
echo "  JSON size: $(du -h "$WORK/out" | cut -f1)"
measure "10^6 rows, --json --summary" "$BIN" fit "$WORK/million.csv" --json --summary
measure "20 files, --report DIR (every format)" "$BIN" fit $(ls "$WORK"/batch/*.csv | head -20) --summary --report "$WORK/reports"
echo "  reports written: $(ls "$WORK/reports" | wc -l) files"
