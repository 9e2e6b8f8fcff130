#!/usr/bin/env bash
# Regenerates the committed outputs of the nulling demo from the repository root:
#   results/cage-null/regenerate.sh [path/to/coilwright]
# The demo field has a small second-order part, so the ambient is fitted to degree 3.
# Inputs: configs/cage-null.toml (the cage) and configs/survey-demo.csv (the invented bench survey,
# written by tests/reference/nulling/make_survey_demo.py). Outputs, all in this folder:
#   cage-null-null.toml  the cage at its nulling currents, with the fitted ambient field
#   cage-null-null.csv   the residual field over the 100 mm target sphere
#   null-report.txt      the printed report; null.json the same as JSON
set -euo pipefail
bin="${1:-build/coilwright}"
out="results/cage-null"
"$bin" -q null configs/cage-null.toml --survey configs/survey-demo.csv --degree 3 --out-dir "$out" > "$out/null-report.txt"
"$bin" -q null configs/cage-null.toml --survey configs/survey-demo.csv --degree 3 --out-dir "$out" --json > "$out/null.json"
