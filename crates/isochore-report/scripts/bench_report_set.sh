#!/usr/bin/env bash
# Used for the README figures: copy each build's target/release/vhfit aside, run them in turn.
# Alternating runs of `vhfit fit assets/demo/binding_qx7_halo2.csv --report DIR` for several
# binaries (paths to vhfit builds).
# usage: bench_report_set.sh ROUNDS BIN...   (prints wall, user, sys, user+sys, peak RSS medians)
# With JOINT=1: the ligand demo's joint report (--model cp --share delta_cp) instead.
R=${1:-7}; shift
ROOT=$(cd "$(dirname "$0")/../../.." && pwd)
D=$ROOT/assets/demo/binding_qx7_halo2.csv
EXTRA=""
if [ -n "$JOINT" ]; then D=$ROOT/assets/demo/ligands_px_orrin3.csv; EXTRA="--model cp --share delta_cp"; fi
T=$(mktemp)
echo "load before: $(uptime)"
for r in $(seq 1 $R); do
  for b in "$@"; do
    out=$(mktemp -d)
    /usr/bin/time -f "%e %U %S %M" -o $T.t $b fit $D $EXTRA --report $out/r > /dev/null 2>&1
    echo "$b $(cat $T.t)" >> $T
    rm -rf $out
  done
done
echo "load after:  $(uptime)"
med() { sort -n | awk '{ v[NR] = $1 } END { printf "%s", v[int((NR + 1) / 2)] }'; }
for b in "$@"; do
  g=$(grep "^$b " $T | cut -d' ' -f2-)
  w=$(echo "$g" | cut -d' ' -f1 | med); u=$(echo "$g" | cut -d' ' -f2 | med); s=$(echo "$g" | cut -d' ' -f3 | med)
  c=$(echo "$g" | awk '{print $2+$3}' | med); m=$(echo "$g" | cut -d' ' -f4 | med)
  lo=$(echo "$g" | cut -d' ' -f1 | sort -n | head -1); hi=$(echo "$g" | cut -d' ' -f1 | sort -n | tail -1)
  printf '%-28s wall %s (%s–%s)  user %s  sys %s  cpu %s  peak %d MiB\n' "$(basename $b)" $w $lo $hi $u $s $c $((m / 1024))
done
rm -f $T $T.t
