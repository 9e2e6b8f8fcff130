#!/bin/sh
# Loop kernel accuracy against 40-digit mpmath values (2400 points: axis, near the wire, far field).
# Usage: bench/loop_accuracy.sh [build-dir]   (default: build-bench; build target bench_loop_accuracy)
set -eu
here=$(cd "$(dirname "$0")" && pwd)
build=${1:-$here/../build-bench}
values=$(mktemp)
trap 'rm -f "$values"' EXIT
/usr/bin/python3 "$here/loop_accuracy.py" "$values"
"$build/bench/bench_loop_accuracy" "$values"
