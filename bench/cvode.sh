#!/usr/bin/env bash
# Builds plateau_bench with SUNDIALS CVODE rows. SUNDIALS is heavy (libsundials-dev brings ~135 packages,
# ~320 MB), so it is not in scripts/install-deps: this script installs it for the benchmark only.
# Usage (as root on Debian 12): bash bench/cvode.sh [build-dir]
set -euo pipefail
src=$(cd "$(dirname "$0")/.." && pwd)
build=${1:-$src/build-bench-cvode}
if ! dpkg -s libsundials-dev > /dev/null 2>&1; then
    apt-get update
    apt-get install -y --no-install-recommends libsundials-dev
fi
cmake -S "$src" -B "$build" -DCMAKE_BUILD_TYPE=Release -DPLATEAU_TESTS=OFF -DPLATEAU_BENCH=ON -DPLATEAU_SUNDIALS=ON
cmake --build "$build" -j2 --target plateau_bench plateau_engine_bench
echo "run: $build/bench/plateau_bench --passes 5"
