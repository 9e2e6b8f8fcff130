#!/usr/bin/env bash
# CI hardening (DEVELOPERS.md, "Robustness"):
#   asan: build-asan, clang with AddressSanitizer + UndefinedBehaviorSanitizer and libFuzzer's
#         coverage; the whole test suite (the fuzz corpus replays included) and the fuzz targets;
#   tsan: build-tsan, clang + libomp + archer with ThreadSanitizer; the tests of the parallel code;
#   fuzz: each fuzz target of build-asan for FUZZ_SECONDS, two at a time.
# One tree serves ASan and fuzzing: a separate fuzz tree would compile the library once more.
# Sanitizer trees are -O1 without benchmarks, and build only what they run.
# Usage: scripts/ci-hardening.sh [asan] [tsan] [fuzz]   (no argument: all three)
# Environment: JOBS (build jobs, 2), FUZZ_SECONDS (60), FUZZ_PARALLEL (2).
set -euo pipefail
cd "$(dirname "$0")/.."
root=$PWD
jobs=${JOBS:-2}
fuzz_seconds=${FUZZ_SECONDS:-60}
fuzz_parallel=${FUZZ_PARALLEL:-2}
steps=("$@")
((${#steps[@]})) || steps=(asan tsan fuzz)

# -O1 keeps sanitizer runs fast enough; line tables suffice for reports and cost less to compile
# than full debug information; asserts stay on (no NDEBUG).
common=(-DCMAKE_C_COMPILER=clang -DCMAKE_CXX_COMPILER=clang++ -DCMAKE_BUILD_TYPE=Debug "-DCMAKE_CXX_FLAGS_DEBUG=-O1 -gline-tables-only" -DCOILWRIGHT_WERROR=ON -DCOILWRIGHT_BENCH=OFF)
archer=/usr/lib/llvm-14/lib/libarcher.so
fuzz_targets=$(sed -n 's/^set(COILWRIGHT_FUZZ_TARGETS \(.*\))$/\1/p' tests/fuzz/CMakeLists.txt)

timed() {  # timed <name> <command...>: runs it and prints its wall time
  local name=$1 start=$SECONDS
  shift
  echo "== ${name}"
  "$@"
  echo "== ${name}: $((SECONDS - start)) s"
}

configure_asan() {
  cmake -S . -B build-asan "${common[@]}" -DCOILWRIGHT_FUZZ=ON >/dev/null
}

asan() {
  configure_asan
  cmake --build build-asan -j"$jobs"
  # halt_on_error: a UBSan report fails its test instead of scrolling past.
  ASAN_OPTIONS=detect_leaks=1:strict_string_checks=1:check_initialization_order=1 \
  UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
    ctest --test-dir build-asan -j"$jobs" --output-on-failure -LE bench
}

tsan() {
  [[ -f $archer ]] || { echo "missing $archer (Debian package libomp-14-dev)"; exit 1; }
  cmake -S . -B build-tsan "${common[@]}" -DCOILWRIGHT_SANITIZE=thread >/dev/null
  cmake --build build-tsan -j"$jobs" --target coilwright_parallel_tests
  # libgomp and libomp are not built with TSan, so TSan cannot see the runtime's barriers and
  # joins. clang links libomp, which loads archer (OMP_TOOL_LIBRARIES): archer tells TSan about
  # OpenMP's synchronisation, and ignore_noninstrumented_modules silences the runtime itself.
  export OMP_TOOL_LIBRARIES=$archer OMP_NUM_THREADS=2
  export TSAN_OPTIONS="ignore_noninstrumented_modules=1 halt_on_error=1 second_deadlock_stack=1 suppressions=$root/tests/tsan/tsan.supp"
  # The setup must report a race in an OpenMP region and accept a correct one (archer loaded).
  local control=build-tsan/openmp_control
  clang++ -std=c++20 -O1 -g -fopenmp -fsanitize=thread tests/tsan/openmp_control.cpp -o "$control"
  clang++ -std=c++20 -O1 -g -fopenmp -fsanitize=thread -DRACE tests/tsan/openmp_control.cpp -o "$control-race"
  "$control" >/dev/null
  if "$control-race" >/dev/null 2>&1; then
    echo "TSan missed the deliberate race in tests/tsan/openmp_control.cpp"
    exit 1
  fi
  build-tsan/tests/tsan/coilwright_parallel_tests '~[cli]'
}

fuzz() {
  configure_asan
  local names=()
  for t in $fuzz_targets; do names+=("fuzz_$t"); done
  cmake --build build-asan -j"$jobs" --target "${names[@]}"
  local pids=() failed=0
  for t in $fuzz_targets; do
    # New inputs go to a scratch folder; the committed corpus and regressions are read only.
    local work=build-asan/fuzz-work/$t
    rm -rf "$work" && mkdir -p "$work/corpus" "$work/artifacts"
    local dirs=("$work/corpus" "tests/fuzz/corpus/$t")
    [[ -d tests/fuzz/regressions/$t ]] && dirs+=("tests/fuzz/regressions/$t")
    build-asan/tests/fuzz/fuzz_"$t" -max_total_time="$fuzz_seconds" -rss_limit_mb=2048 -timeout=10 \
      -print_final_stats=1 -artifact_prefix="$work/artifacts/" "${dirs[@]}" >"$work/log" 2>&1 &
    pids+=("$!:$t")
    if ((${#pids[@]} == fuzz_parallel)); then
      for p in "${pids[@]}"; do wait "${p%%:*}" || { failed=1; echo "fuzz_${p#*:} failed:"; tail -n 60 "build-asan/fuzz-work/${p#*:}/log"; }; done
      pids=()
    fi
  done
  for p in "${pids[@]}"; do wait "${p%%:*}" || { failed=1; echo "fuzz_${p#*:} failed:"; tail -n 60 "build-asan/fuzz-work/${p#*:}/log"; }; done
  for t in $fuzz_targets; do
    printf '%-22s %s\n' "fuzz_$t" "$(grep -E '^stat::number_of_executed_units' "build-asan/fuzz-work/$t/log" | awk '{print $2 " executions"}')"
  done
  if ((failed)); then
    echo "a fuzzer found a failing input: see build-asan/fuzz-work/<target>/artifacts; add it to tests/fuzz/regressions/<target>/"
    exit 1
  fi
}

for s in "${steps[@]}"; do
  case $s in
    asan | tsan | fuzz) timed "$s" "$s" ;;
    *) echo "unknown step '$s' (asan, tsan, fuzz)"; exit 2 ;;
  esac
done
