#!/usr/bin/env bash
# Wall time of `plateau run` on a one-dose regimen and of `plateau --version`: the median of N runs (default 30),
# with minor page faults from /usr/bin/time. Usage: bench/startup.sh path/to/plateau [N]
set -euo pipefail
bin=${1:?usage: bench/startup.sh path/to/plateau [N]}
n=${2:-30}
dir=$(mktemp -d)
trap 'rm -rf "$dir"' EXIT
cat > "$dir/one.toml" <<'TOML'
id = "one-dose"
model = "one-compartment-oral"
about = "fictional: one 500 mg oral dose"
[[doses]]
route = "oral"
amount = "500 mg"
at = "0 h"
[horizon]
until = "24 h"
step = "1 h"
TOML
median_ms() {
    local times=()
    for _ in $(seq "$n"); do
        local a b
        a=$(date +%s%N)
        "$@" > /dev/null
        b=$(date +%s%N)
        times+=($(( (b - a) / 1000 )))
    done
    printf '%s\n' "${times[@]}" | sort -n | awk '{v[NR]=$1} END {printf "%.1f ms median, %.1f ms fastest", v[int((NR+1)/2)]/1000, v[1]/1000}'
}
echo "plateau run (one dose): $(median_ms "$bin" run "$dir/one.toml"); $(/usr/bin/time -f '%R minor page faults' "$bin" run "$dir/one.toml" 2>&1 >/dev/null)"
echo "plateau --version:      $(median_ms "$bin" --version); $(/usr/bin/time -f '%R minor page faults' "$bin" --version 2>&1 >/dev/null)"
