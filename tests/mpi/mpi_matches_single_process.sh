#!/usr/bin/env bash
# The MPI build with 2 ranks gives byte-identical ranked designs (designs.csv) and Monte Carlo
# builds (CSV) and equal statistics to a single process with the same seed. Common practice,
# no source: per-index seeding and index-ordered gathering make the split irrelevant.
# Usage: mpi_matches_single_process.sh <coilwright> <coilwright-mpi> <mpirun> <source dir> <work dir>
set -euo pipefail
single=$1 mpi=$2 mpirun=$3 src=$4 work=$5
rm -rf "$work" && mkdir -p "$work"
config="$src/tests/mpi/small-search.toml"
run_mpi() { "$mpirun" --allow-run-as-root --oversubscribe -np 2 "$mpi" --threads 1 "$@"; }

"$single" -q --threads 2 design "$config" --out "$work/single" >/dev/null
run_mpi design "$config" --out "$work/mpi" >/dev/null
cmp "$work/single/designs.csv" "$work/mpi/designs.csv"
echo "designs.csv: identical ($(($(wc -l < "$work/single/designs.csv") - 1)) designs)"

design="$work/single/design-01.toml"
"$single" -q --threads 2 tolerance "$design" --samples 300 --seed 11 --trim --out "$work/tol-single" >/dev/null
run_mpi tolerance "$design" --samples 300 --seed 11 --trim --out "$work/tol-mpi" >/dev/null
cmp "$work/tol-single/design-01-builds.csv" "$work/tol-mpi/design-01-builds.csv"
python3 - "$work/tol-single/design-01-tolerance.json" "$work/tol-mpi/design-01-tolerance.json" <<'PY'
import json, sys
a, b = (json.load(open(f)) for f in sys.argv[1:3])
for j in (a, b):
    j.pop("seconds")
assert a == b, "tolerance JSON differs"
print(f"builds: identical; yield {a['yield']} +- {a['yield_standard_error']}, p99 {a['percentiles']['p99']}")
PY
