#!/usr/bin/env bash
# Installs what coilwright needs to build, test and benchmark, from Debian 12's archive only.
# Idempotent: packages already present are left as they are.
set -euo pipefail
packages=(
  build-essential cmake git
  libeigen3-dev libnlopt-cxx-dev libboost-dev libtomlplusplus-dev
  libcli11-dev libfmt-dev nlohmann-json3-dev catch2
  python3 python3-mpmath python3-scipy python3-numpy
  pkg-config libplplot-dev chromium python3-pil
  # Sanitizer and fuzzing builds (scripts/ci-hardening.sh): clang with libFuzzer and the
  # sanitizer runtimes, libomp with archer for ThreadSanitizer.
  clang libclang-rt-14-dev libomp-14-dev
)
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if ((${#missing[@]})); then
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends "${missing[@]}"
fi
