#!/usr/bin/env bash
# Cold start of the window to its first frame on screen, with the demo (issue 14).
#
# Usage: scripts/bench_window_start.sh VHFIT [RUNS]
#
# Starts `VHFIT` (a build with the window, i.e. default features) RUNS times (default 5)
# under Xvfb (1600 × 1000, Mesa's software OpenGL), each run with a fresh, empty HOME, so
# every run is a first start: no preferences, the demo project opened. The window's
# cold-start probe (ISOCHORE_FIRST_FRAME, isochore_gui::start::FirstFrameProbe) writes the
# time its first frame was on screen and closes the window; this script prints, for each
# run, the time from its own start of the program to that frame, and the median. The file
# cache is warm (the binary was run before): it is the start-up of the program, not of the
# disk.
set -euo pipefail
VHFIT="$1"
RUNS="${2:-5}"
WORK="$(mktemp -d)"
DISP=":97"
Xvfb "$DISP" -screen 0 1600x1000x24 -nolisten tcp >/dev/null 2>&1 &
XPID=$!
trap 'kill "$XPID" 2>/dev/null; rm -rf "$WORK"' EXIT
sleep 1
# One run first so that the binary and the GL libraries are in the file cache.
HOME="$WORK/warm" DISPLAY="$DISP" LIBGL_ALWAYS_SOFTWARE=1 ISOCHORE_FIRST_FRAME=1 \
    "$VHFIT" >/dev/null 2>&1 || true
for i in $(seq "$RUNS"); do
    home="$WORK/home$i"
    mkdir -p "$home"
    t0=$(date +%s%N)
    HOME="$home" XDG_DATA_HOME="$home/.local/share" XDG_CONFIG_HOME="$home/.config" \
        DISPLAY="$DISP" LIBGL_ALWAYS_SOFTWARE=1 ISOCHORE_FIRST_FRAME=1 \
        "$VHFIT" >/dev/null 2>"$WORK/err$i" || true
    line=$(grep "first frame on screen" "$WORK/err$i" || true)
    if [ -z "$line" ]; then
        echo "run $i: no first frame reported:" >&2
        cat "$WORK/err$i" >&2
        exit 1
    fi
    t1=${line#*unix_ns=}
    t1=${t1%% *}
    ms=$(( (t1 - t0) / 1000000 ))
    echo "$ms" >>"$WORK/ms"
    echo "run $i: ${ms} ms to the first frame (${line#*since_process_start=} since the process started)"
done
echo "median: $(sort -n "$WORK/ms" | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}') ms of $RUNS runs"
