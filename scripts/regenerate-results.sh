#!/usr/bin/env bash
# Regenerates the committed outputs of every bundled scenario under results/.
# Usage: scripts/regenerate-results.sh [path/to/coilwright]   (default: build/coilwright)
# Searches are seeded and the report's date comes from SOURCE_DATE_EPOCH, so reruns give the same files.
set -euo pipefail
cd "$(dirname "$0")/.."
bin=${1:-build/coilwright}
export SOURCE_DATE_EPOCH=${SOURCE_DATE_EPOCH:-1767225600}
for config in sensor-calibration-rig solenoid-end-correction three-axis-cage gradient-pair; do
  "$bin" --quiet design "configs/$config.toml" --out "results/$config"
done
if [ -x results/cage-null/regenerate.sh ]; then results/cage-null/regenerate.sh "$bin"; fi
