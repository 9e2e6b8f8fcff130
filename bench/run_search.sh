#!/bin/sh
# The three-coil worst-deviation search: coilwright (bench_search) against a plain
# scipy.optimize + scipy.special script of the same problem (search_scipy.py), alternately for
# several rounds; prints each round's times and objectives, then the medians and the ratios.
# Usage: bench/run_search.sh [build-dir] [rounds]   (default: build-bench, 3; build it first:
#   cmake --build <build-dir> --target bench_search)
# Optional: MALLOC_TUNED=1 also runs coilwright with glibc's heap kept between evaluations
# (MALLOC_TRIM_THRESHOLD_/MALLOC_MMAP_THRESHOLD_), a diagnostic of the allocator's share;
# BASELINE=<build-dir> also runs that (older) build's bench_search in every round, as before_*
# rows, so that a change is measured against its baseline under the same load.
set -eu
here=$(cd "$(dirname "$0")" && pwd)
build=${1:-$here/../build-bench}
rounds=${2:-3}
echo "load before: $(uptime)"
all=""
i=1
while [ "$i" -le "$rounds" ]; do
  ours=$("$build/bench/bench_search" 5)
  theirs=$(/usr/bin/python3 "$here/search_scipy.py" 3)
  tuned=""
  if [ "${MALLOC_TUNED:-0}" = 1 ]; then
    tuned=$(MALLOC_TRIM_THRESHOLD_=1000000000 MALLOC_MMAP_THRESHOLD_=1000000000 "$build/bench/bench_search" 5 | sed 's/^coilwright_/tuned_/')
  fi
  before=""
  if [ -n "${BASELINE:-}" ]; then
    before=$("$BASELINE/bench/bench_search" 5 | sed 's/^coilwright_/before_/')
  fi
  all=$(printf '%s\nround %s\n%s\n%s\n%s\n%s' "$all" "$i" "$ours" "$theirs" "$tuned" "$before")
  i=$((i + 1))
done
echo "load after:  $(uptime)"
printf '%s\n' "$all" | awk '
  function median(a, n,   i, j, t, b) {
    for (i = 1; i <= n; i++) b[i] = a[i]
    for (i = 2; i <= n; i++) { t = b[i]; for (j = i - 1; j >= 1 && b[j] > t; j--) b[j + 1] = b[j]; b[j + 1] = t }
    return n % 2 ? b[(n + 1) / 2] : (b[n / 2] + b[n / 2 + 1]) / 2
  }
  $1 == "round" { r = $2; next }
  NF == 2 { v[$1, r] = $2; seen[$1] = 1 }
  END {
    n = r
    ncases = split("coilwright_reduced_1thread coilwright_reduced_allthreads coilwright_points_1thread coilwright_points_allthreads tuned_reduced_1thread tuned_points_1thread before_reduced_1thread before_reduced_allthreads before_points_1thread before_points_allthreads", cases, " ")
    printf "scipy (2000 points): multistart Nelder-Mead %.4f s (objective %.9e, %d evaluations); bounded Brent %.4f s (objective %.9e, %d evaluations)\n",
      med("scipy_multistart_seconds"), v["scipy_multistart_objective", 1], v["scipy_multistart_evaluations", 1],
      med("scipy_bounded_seconds"), v["scipy_bounded_objective", 1], v["scipy_bounded_evaluations", 1]
    best_scipy = v["scipy_multistart_objective", 1] < v["scipy_bounded_objective", 1] ? v["scipy_multistart_objective", 1] : v["scipy_bounded_objective", 1]
    printf "%-30s %9s %9s %8s %15s %15s %9s %9s\n", "coilwright case", "seconds", "samples", "evals", "objective@2000", "own samples", "vs multi", "vs Brent"
    for (k = 1; k <= ncases; k++) {
      c = cases[k]
      if (!((c "_seconds") in seen)) continue
      for (i = 1; i <= n; i++) { t[i] = v[c "_seconds", i]; rm[i] = v["scipy_multistart_seconds", i] / t[i]; rb[i] = v["scipy_bounded_seconds", i] / t[i] }
      obj = v[c "_objective", 1]
      printf "%-30s %9.5f %9d %8d %15.9e %15.9e %8.1fx %8.1fx %s\n", c, median(t, n), v[c "_samples", 1], v[c "_evaluations", 1], obj,
        v[c "_objective_own_samples", 1], median(rm, n), median(rb, n), obj <= best_scipy * (1 + 1e-9) ? "(objective as good)" : "(objective WORSE)"
    }
    for (k = 1; k <= 4; k++) {
      c = cases[k]; b = c; sub(/^coilwright_/, "before_", b)
      if (!((c "_seconds") in seen) || !((b "_seconds") in seen)) continue
      for (i = 1; i <= n; i++) rs[i] = v[b "_seconds", i] / v[c "_seconds", i]
      printf "speed-up over BASELINE, %-18s %8.1fx (median of per-round ratios)\n", substr(c, 12), median(rs, n)
    }
    print "objective@2000: worst |B - B_goal| / |B_goal| of the found design (its own currents) over the 2000-point sphere scipy uses;"
    print "ratios: scipy seconds / coilwright seconds, medians over rounds. Target: >= 50x with an objective at least as good."
  }
  function med(key,   i, a) { for (i = 1; i <= n; i++) a[i] = v[key, i]; return median(a, n) }'
