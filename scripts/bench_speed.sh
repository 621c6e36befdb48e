#!/usr/bin/env bash
# The figures of issue 14 in one run: two builds of `vhfit` (before and after), the floor
# (crates/isochore-data/examples/floor.rs: read the file and split it into lines and cells,
# no number converted; with --hash also its SHA-256) and the pandas + statsmodels script
# (scripts/bench_python.py), each as a whole process, on the same 10^6-row CSV, in
# alternating rounds so that all see the same load. Prints the median and range of the
# wall time and the median peak RSS (/usr/bin/time) of each, with `uptime` before and after.
#
# Usage: scripts/bench_speed.sh BEFORE/vhfit AFTER/vhfit FLOOR [ROUNDS (default 5)]
#   FLOOR: the floor example's binary (cargo build --release -p isochore-data --example floor;
#   target/release/examples/floor)
set -euo pipefail
cd "$(dirname "$0")/.."
BEFORE="$1"
AFTER="$2"
FLOOR="$3"
ROUNDS="${4:-5}"
WORK="$(mktemp -d)"
trap 'rm -rf "$WORK"' EXIT

awk -v n=1000000 -v seed=7 'BEGIN {
    srand(seed); R = 8.314462618; dh = -45000; ds = -60;
    print "T (°C),K,sigma_K";
    for (i = 0; i < n; i++) {
        t = 5 + 55 * (n > 1 ? i / (n - 1) : 0);
        k = exp(-dh / (R * (t + 273.15)) + ds / R);
        u1 = rand(); if (u1 < 1e-12) u1 = 1e-12; u2 = rand();
        z = sqrt(-2 * log(u1)) * cos(6.283185307179586 * u2);
        printf "%.4f,%.6g,%.3g\n", t, k * (1 + 0.02 * z), 0.02 * k;
    }
}' > "$WORK/million.csv"
head -26 "$WORK/million.csv" | awk -F, 'NR == 1 { print; next } { printf "%.4f,%s,%s\n", 5 + 2.2 * (NR - 2), $2 * exp(0.2 * (NR - 2)) / 20, $3 }' > "$WORK/one.csv"
M="$WORK/million.csv"
echo "file: $(wc -c < "$M") bytes, $(($(wc -l < "$M") - 1)) rows; $(nproc) cores"
echo "load before: $(uptime)"

jobs=(
    "floor|$FLOOR $M"
    "floor + SHA-256|$FLOOR $M --hash"
    "before: fit --summary|$BEFORE fit $M --summary"
    "after: fit --summary|$AFTER fit $M --summary"
    "before: fit --json (points)|$BEFORE fit $M --json"
    "after: fit --json (points)|$AFTER fit $M --json"
    "pandas + statsmodels|python3 scripts/bench_python.py $M"
    "before: report set, one series|$BEFORE fit $WORK/one.csv --summary --report $WORK/rb"
    "after: report set, one series|$AFTER fit $WORK/one.csv --summary --report $WORK/ra"
)
for r in $(seq 1 "$ROUNDS"); do
    for j in "${jobs[@]}"; do
        label="${j%%|*}"
        cmd="${j#*|}"
        rm -rf "$WORK/rb" "$WORK/ra"
        # shellcheck disable=SC2086
        # Output to /dev/null: the program's time, not the disk's (the --json of 10^6
        # points is 342 MB).
        /usr/bin/time -f "%e %M" -o "$WORK/t" $cmd > /dev/null 2> /dev/null || true
        echo "$label|$(cat "$WORK/t")" >> "$WORK/times"
    done
done
echo "load after:  $(uptime)"
printf '%-34s %10s %18s %12s\n' "job" "median s" "range s" "peak RSS MiB"
median() { sort -n | awk '{ v[NR] = $1 } END { printf "%s %s %s", v[int((NR + 1) / 2)], v[1], v[NR] }'; }
for j in "${jobs[@]}"; do
    label="${j%%|*}"
    vals=$(grep -F "$label|" "$WORK/times" | cut -d'|' -f2)
    read -r t lo hi <<< "$(echo "$vals" | cut -d' ' -f1 | median)"
    read -r m _ _ <<< "$(echo "$vals" | cut -d' ' -f2 | median)"
    printf '%-34s %10.2f %8.2f – %-7.2f %12.0f\n' "$label" "$t" "$lo" "$hi" "$((m / 1024))"
done
