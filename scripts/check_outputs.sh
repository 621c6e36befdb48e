#!/usr/bin/env bash
# Before/after check of the speed work of issue 14: two builds of `vhfit` must write the
# same bytes. Runs both on the same inputs and compares the SHA-256 of everything they
# print (JSON with and without points, the text summary and table) and of the report files
# whose content is numbers (results CSV, data CSV, Markdown; the HTML and PDF embed the
# time they were written, so only their numbers are compared, after removing dates).
#
# Inputs: every good import fixture (tests/data/import), the demo data sets, a file with a
# series name holding control and non-ASCII characters, exact data (residuals of ±0 and
# negative zero), rows excluded (null studentized residuals), unweighted (null σ), the
# constant-ΔCp° and Clarke–Glew models, a calorimetric comparison, several files at once
# (an array with "source"), and one file of 10^6 rows (generated here, as in
# scripts/bench_batch.sh).
#
# Usage: scripts/check_outputs.sh BEFORE/vhfit AFTER/vhfit
# Exit code 0 when every output is the same, 1 otherwise (the differing runs are listed).
set -euo pipefail
cd "$(dirname "$0")/.."
BEFORE="$1"
AFTER="$2"
WORK="$(mktemp -d)"
trap 'rm -rf "$WORK"' EXIT

gen() { # gen FILE ROWS SEED (the generator of scripts/bench_batch.sh)
    awk -v n="$2" -v seed="$3" 'BEGIN {
        srand(seed); R = 8.314462618; dh = -45000; ds = -60;
        print "T (°C),K,sigma_K";
        for (i = 0; i < n; i++) {
            t = 5 + 55 * (n > 1 ? i / (n - 1) : 0);
            k = exp(-dh / (R * (t + 273.15)) + ds / R);
            u1 = rand(); if (u1 < 1e-12) u1 = 1e-12; u2 = rand();
            z = sqrt(-2 * log(u1)) * cos(6.283185307179586 * u2);
            printf "%.4f,%.6g,%.3g\n", t, k * (1 + 0.02 * z), 0.02 * k;
        }
    }' > "$1"
}

gen "$WORK/million.csv" 1000000 7
gen "$WORK/small.csv" 25 3
# Exact ln K = 0 at every temperature (K = 1): fitted values, residuals and ΔH° of ±0.
printf 'T (K),ln K\n280,0\n290,0\n300,0\n310,0\n320,0\n' > "$WORK/zeros.csv"
# Exact linear data: residuals of rounding size and of either sign.
printf 'T (K),ln K\n280,2.5\n290,2\n300,1.5\n310,1\n320,0.5\n330,0\n' > "$WORK/exact.csv"
# A series name with a C1 control, a bidirectional override and non-ASCII letters.
printf 'series,T (°C),K,sigma_K\n"a\xc2\x9bb\xe2\x80\xaec µ°",10,5.1e4,1000\n"a\xc2\x9bb\xe2\x80\xaec µ°",20,3.2e4,800\n"a\xc2\x9bb\xe2\x80\xaec µ°",30,2.0e4,500\n"a\xc2\x9bb\xe2\x80\xaec µ°",40,1.4e4,400\nplain,10,5e4,1000\nplain,20,3e4,800\nplain,30,2.1e4,500\nplain,40,1.3e4,300\n' > "$WORK/names.csv"

runs=()
add() { runs+=("$*"); }
for f in tests/data/import/*.csv tests/data/import/*.txt tests/data/import/*.tsv assets/demo/*.csv; do
    add fit "$f" --json --skip-bad-rows
    add fit "$f" --json --summary --skip-bad-rows
    add fit "$f" --skip-bad-rows
done
for f in "$WORK/small.csv" "$WORK/zeros.csv" "$WORK/exact.csv" "$WORK/names.csv"; do
    add fit "$f" --json
    add fit "$f" --json --unweighted
    add fit "$f" --json --exclude 2,4
    add fit "$f" --json --model cp
    add fit "$f" --summary
done
add fit "$WORK/small.csv" --json --model clarke-glew --exclude 1
add fit "$WORK/small.csv" --json --calorimetric 25C:-45:0.5
add fit "$WORK/small.csv" --json --calorimetric 25C:-45:0.5 --summary
add fit "$WORK/small.csv" "$WORK/zeros.csv" "$WORK/names.csv" "$WORK/missing.csv" --json
add fit "$WORK/small.csv" "$WORK/exact.csv" --json --summary
add fit "$WORK/million.csv" --json
add fit "$WORK/million.csv" --json --summary
add fit "$WORK/million.csv" --json --exclude 3,500000
add fit "$WORK/million.csv" --summary
add fit "$WORK/million.csv" --json --unweighted --summary

status=0
n=0
for r in "${runs[@]}"; do
    # shellcheck disable=SC2086
    a=$("$BEFORE" $r 2>&1 | sha256sum | cut -c1-64 || true)
    # shellcheck disable=SC2086
    b=$("$AFTER" $r 2>&1 | sha256sum | cut -c1-64 || true)
    n=$((n + 1))
    if [ "$a" != "$b" ]; then
        echo "DIFFERS: vhfit $r"
        status=1
    fi
done

# Reports of one series: the files whose bytes are numbers and words.
for bin in "$BEFORE" "$AFTER"; do
    d="$WORK/report-$(echo "$bin" | sha256sum | cut -c1-8)"
    mkdir -p "$d"
    "$bin" fit "$WORK/small.csv" --report "$d" > /dev/null 2>&1 || true
    "$bin" fit assets/demo/binding_qx7_halo2.csv --report "$d" > /dev/null 2>&1 || true
done
dirs=("$WORK"/report-*)
for f in "${dirs[0]}"/*; do
    name=$(basename "$f")
    g="${dirs[1]}/$name"
    n=$((n + 1))
    case "$name" in
        *.csv | *.md)
            # The settings name the command line, which names the (temporary) folder.
            if ! diff -q <(sed "s#${dirs[0]}#DIR#g" "$f") <(sed "s#${dirs[1]}#DIR#g" "$g") > /dev/null; then
                echo "DIFFERS: report $name"
                status=1
            fi
            ;;
        *.html)
            # Numbers only: dates and times and the folder are left out.
            nums() { sed -e "s#$2#DIR#g" "$1" | grep -oE -- '-?[0-9]+(\.[0-9]+)?' | grep -vE '^20[0-9]{2}$' ; }
            if ! diff -q <(nums "$f" "${dirs[0]}" | sort) <(nums "$g" "${dirs[1]}" | sort) > /dev/null; then
                echo "NUMBERS DIFFER (or a time of writing): report $name"
            fi
            ;;
    esac
done
echo "$n outputs compared; $([ $status = 0 ] && echo "all the same" || echo "some differ")"
exit $status
