#!/bin/sh
# Time from launching the window (the demo) to its first drawn frame, under Xvfb.
#
# Usage: crates/twofold/benches/first_frame.sh [BINARY] [TIMES]
# (default target/release/twofold, 5 launches; the first launch warms the file cache and is not
# counted). Needs Xvfb, xdotool and ImageMagick's `import`.
#
# The clock starts just before the launch. The window is found with `xdotool search --sync`, then
# its picture is taken again and again until it shows the drawn window (more than 50 distinct
# colours; an undrawn window is one flat colour). The figure is therefore the time to the first
# frame on screen plus at most one screenshot (about 30 ms here).
set -eu
BIN=${1:-target/release/twofold}
TIMES=${2:-5}
DISP=:97
Xvfb "$DISP" -screen 0 1600x1000x24 -nolisten tcp >/dev/null 2>&1 &
XVFB=$!
trap 'kill "$XVFB" 2>/dev/null || true' EXIT
sleep 1
STATE=$(mktemp -d)
mkdir -p "$STATE/run" && chmod 700 "$STATE/run"
for i in $(seq 0 "$TIMES"); do
    start=$(date +%s%N)
    env -u WAYLAND_DISPLAY DISPLAY="$DISP" XDG_RUNTIME_DIR="$STATE/run" \
        XDG_DATA_HOME="$STATE/data" XDG_CONFIG_HOME="$STATE/config" "$BIN" >/dev/null 2>&1 &
    app=$!
    win=$(DISPLAY="$DISP" xdotool search --sync --name Twofold | head -n 1)
    mapped=$(date +%s%N)
    while :; do
        colours=$(DISPLAY="$DISP" import -window "$win" miff:- 2>/dev/null | identify -format '%k' - 2>/dev/null || echo 0)
        if [ "${colours:-0}" -gt 50 ]; then
            break
        fi
    done
    drawn=$(date +%s%N)
    kill "$app"
    wait "$app" 2>/dev/null || true
    if [ "$i" -gt 0 ]; then
        echo "launch $i: window mapped after $(( (mapped - start) / 1000000 )) ms, first frame on screen after $(( (drawn - start) / 1000000 )) ms"
    fi
done
rm -rf "$STATE"
