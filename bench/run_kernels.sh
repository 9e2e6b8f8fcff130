#!/bin/sh
# Runs the C++ kernel benchmark and the numpy baseline on the same points, alternately, for
# several rounds, and prints each round's figures and the medians of the figures and ratios.
# Usage: bench/run_kernels.sh [build-dir] [rounds]   (default: build-kernels, 5; build it first:
#   cmake --build <build-dir> --target bench_kernels)
# On a shared machine the load (uptime) is printed with the figures; ratios are taken within
# each round so that both sides see the same load.
set -eu
here=$(cd "$(dirname "$0")" && pwd)
build=${1:-$here/../build-kernels}
rounds=${2:-5}
echo "load before: $(uptime)"
all=""
i=1
while [ "$i" -le "$rounds" ]; do
  ours=$("$build/bench/bench_kernels")
  theirs=$(/usr/bin/python3 "$here/loop_numpy.py")
  if [ "$i" -eq 1 ]; then echo "$ours" | head -n 1; fi
  all=$(printf '%s\nround %s\n%s\n%s' "$all" "$i" "$ours" "$theirs")
  i=$((i + 1))
done
echo "load after:  $(uptime)"
printf '%s\n' "$all" | awk '
  function median(a, n,   i, j, t) {
    for (i = 2; i <= n; i++) { t = a[i]; for (j = i - 1; j >= 1 && a[j] > t; j--) a[j + 1] = a[j]; a[j + 1] = t }
    return n % 2 ? a[(n + 1) / 2] : (a[n / 2] + a[n / 2 + 1]) / 2
  }
  $1 == "round" { r = $2 }
  $1 ~ /_ns/ { v[$1, r] = $2; keys[$1] = 1 }
  END {
    n = r
    printf "%-6s %8s %8s %8s %8s %8s %8s %8s | %7s %7s %7s\n", "round", "loop1", "loopN", "loopNcpu", "seg1", "segN", "segNcpu", "numpy", "np/l1", "np/lN", "np/lNc"
    for (i = 1; i <= n; i++) {
      np = v["numpy_loop_ns", i]
      a1[i] = v["loop_ns_1thread", i]; aN[i] = v["loop_ns_allthreads", i]; aC[i] = v["loop_ns_allthreads_cpu", i]
      s1[i] = v["segment_ns_1thread", i]; sN[i] = v["segment_ns_allthreads", i]; sC[i] = v["segment_ns_allthreads_cpu", i]
      p[i] = np; r1[i] = np / a1[i]; rN[i] = np / aN[i]; rC[i] = np / aC[i]
      printf "%-6d %8.3f %8.3f %8.3f %8.3f %8.3f %8.3f %8.3f | %6.1fx %6.1fx %6.1fx\n", i, a1[i], aN[i], aC[i], s1[i], sN[i], sC[i], np, r1[i], rN[i], rC[i]
    }
    printf "%-6s %8.3f %8.3f %8.3f %8.3f %8.3f %8.3f %8.3f | %6.1fx %6.1fx %6.1fx\n", "median", median(a1, n), median(aN, n), median(aC, n), median(s1, n), median(sN, n), median(sC, n), median(p, n), median(r1, n), median(rN, n), median(rC, n)
    print "ns per filament-point (segment: per segment-point). loopN/segN: wall time with all threads;"
    print "loopNcpu/segNcpu: all threads, from each thread'"'"'s own CPU time (excludes waiting for a core on a busy machine)."
    print "targets: np/l1 >= 7x (1 thread), np/lN >= 13x (both cores), segment < 4 ns"
  }'
