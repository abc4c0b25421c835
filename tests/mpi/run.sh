#!/usr/bin/env bash
# The MPI population test: the same small population on 1, 2 and 3 processes must give byte for byte the JSON,
# CSV and report of the reference run (a plateau built without MPI, or else the MPI binary run as one process),
# and a bad input must be reported once with exit code 1.
# Usage: tests/mpi/run.sh MPI_PLATEAU [REFERENCE_PLATEAU] [MPIRUN]
set -euo pipefail
mpi_bin=$1
ref_bin=${2:-}
[ -n "$ref_bin" ] || ref_bin=$mpi_bin
mpirun=${3:-mpirun}
root=$(cd "$(dirname "$0")/../.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
cd "$root"
launch=("$mpirun" --oversubscribe)
[ "$(id -u)" -ne 0 ] || launch+=(--allow-run-as-root)
# 37 patients: not a multiple of 2 or 3, so the shares differ in size.
args=(population regimens/zelmarin-pop-q8h-30min.toml regimens/zelmarin-pop-q8h-4h.toml
      --cohort cohorts/zelmarin-adults.toml --size 37 --seed 5 --threads 2 --above 4mg/L --above-for 50%
      --pta-curve 0.5mg/L..16mg/L --thresholds cohorts/zelmarin-thresholds.toml)
fail() { echo "mpi test: $*" >&2; exit 1; }

"$ref_bin" "${args[@]}" --json "$work/ref.json" --csv "$work/ref.csv" --report "$work/ref.html" > "$work/ref.txt"
for k in 1 2 3; do
  "${launch[@]}" -np $k "$mpi_bin" "${args[@]}" --json "$work/k$k.json" --csv "$work/k$k.csv" --report "$work/k$k.html" \
    > "$work/k$k.txt" 2> "$work/k$k.err" || fail "K=$k exited with $? ($(cat "$work/k$k.err"))"
  sed -i "s|/k$k\.|/ref.|" "$work/k$k.txt"   # the "Wrote FILE" lines name this run's files
  for f in json csv html txt; do
    cmp "$work/ref.$f" "$work/k$k.$f" || fail "K=$k: the $f output differs from the single-process run"
  done
  echo "mpi test: K=$k gives the single-process JSON, CSV, report and summary byte for byte"
done

# A bad input: the usual message, once, and exit code 1 (from mpirun, so from every process).
set +e
"${launch[@]}" -np 2 "$mpi_bin" population regimens/zelmarin-pop-q8h-30min.toml --cohort regimens/zelmarin-q8h-4h.toml \
  --size 10 > "$work/bad.out" 2> "$work/bad.err"
code=$?
set -e
[ "$code" -eq 1 ] || fail "bad input: exit code $code, expected 1"
"$ref_bin" population regimens/zelmarin-pop-q8h-30min.toml --cohort regimens/zelmarin-q8h-4h.toml --size 10 \
  > /dev/null 2> "$work/bad-ref.err" || true
# mpirun adds its own note after the message: compare the part before it, and count the message once.
head -c "$(stat -c %s "$work/bad-ref.err")" "$work/bad.err" | cmp - "$work/bad-ref.err" ||
  fail "bad input: the message differs from the single-process one"
[ "$(grep -c "no \[covariates\] and no \[resample\]" "$work/bad.err")" -eq 1 ] || fail "bad input: the message is not there once"
echo "mpi test: a bad input is reported once, exit code 1"
