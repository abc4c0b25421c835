#!/usr/bin/env bash
# The MPI population test (population and dose --pta): the same small population on 1, 2 and 3 processes must give byte for byte the JSON,
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

# A numerical failure: with seed 11, exactly one of 12 subjects (number 8, index 7: process 1 for K = 2 and for
# K = 3) has a gain above the blow-up threshold of tests/mpi/data/mpi-fault.toml. It is counted, the same way
# for every K.
fault=(population tests/mpi/data/mpi-fault-regimen.toml --cohort tests/mpi/data/mpi-fault-cohort.toml --size 12 --seed 11)
"$ref_bin" "${fault[@]}" --json "$work/fref.json" --csv "$work/fref.csv" > /dev/null
grep -q '^8,mpi-fault-daily,failed,' "$work/fref.csv" || fail "fault case: subject 8 did not fail"
[ "$(grep -c ',failed,' "$work/fref.csv")" -eq 1 ] || fail "fault case: expected exactly one failed subject"
for k in 1 2 3; do
  "${launch[@]}" -np $k "$mpi_bin" "${fault[@]}" --json "$work/f$k.json" --csv "$work/f$k.csv" > "$work/f$k.txt" ||
    fail "fault case, K=$k: exit code $?"
  grep -q "1 failed numerically" "$work/f$k.txt" || fail "fault case, K=$k: the failure is not counted in the summary"
  cmp "$work/fref.json" "$work/f$k.json" || fail "fault case, K=$k: the JSON differs"
  cmp "$work/fref.csv" "$work/f$k.csv" || fail "fault case, K=$k: the CSV differs"
done
echo "mpi test: one subject failing on process 1 is counted, same outputs for K = 1, 2, 3"

# The dose search over virtual patients: the same JSON, summary and written regimen for K = 1, 2, 3 (23 patients,
# two candidates, so the shares differ in size and every process searches both).
dose=(dose regimens/zelmarin-pop-q8h-4h.toml --cohort cohorts/zelmarin-adults.toml --pta 80% --size 23 --seed 6
      --threads 2 --intervals 8h,12h --round 250mg --above-for 50%)
"$ref_bin" "${dose[@]}" --json "$work/dref.json" --write "$work/dref.toml" > "$work/dref.txt"
grep -q "reaches 80.0 %" "$work/dref.txt" || fail "dose: the reference run found no population dose"
for k in 1 2 3; do
  "${launch[@]}" -np $k "$mpi_bin" "${dose[@]}" --json "$work/d$k.json" --write "$work/d$k.toml" > "$work/d$k.txt" \
    2> "$work/d$k.err" || fail "dose, K=$k exited with $? ($(cat "$work/d$k.err"))"
  sed -i "s|/d$k\.|/dref.|" "$work/d$k.txt"
  for f in json toml txt; do
    cmp "$work/dref.$f" "$work/d$k.$f" || fail "dose, K=$k: the $f output differs from the single-process run"
  done
done
echo "mpi test: dose --pta gives the single-process JSON, summary and written regimen for K = 1, 2, 3"

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
