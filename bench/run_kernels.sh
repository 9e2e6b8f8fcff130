#!/bin/sh
# Runs the C++ kernel benchmark and the numpy baseline on the same points and prints the ratios.
# Usage: bench/run_kernels.sh [build-dir]   (default: build-kernels; build it first)
set -eu
here=$(cd "$(dirname "$0")" && pwd)
build=${1:-$here/../build-kernels}
ours=$("$build/bench/bench_kernels")
theirs=$(/usr/bin/python3 "$here/loop_numpy.py")
echo "$ours"
echo "$theirs"
printf '%s\n%s\n' "$ours" "$theirs" | awk '
  $1 == "numpy_loop_ns" { np = $2 }
  $1 == "loop_ns_1thread" { l1 = $2 }
  $1 == "loop_ns_allthreads" { ln = $2 }
  END {
    printf "ratio numpy/ours loop, 1 thread:    %.1fx\n", np / l1
    printf "ratio numpy/ours loop, all threads: %.1fx\n", np / ln
  }'
