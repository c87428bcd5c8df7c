#!/usr/bin/env bash
# Time and peak resident memory of the limits cases (scripts/limits_cases.py)
# under the defaults and under --seconds S, one run each, release build:
#   cargo build --release --example descend
#   scripts/limits_measure.sh [S ...]        (default S: 0.5)
# Prints: tag, options, wall time (m:ss.ss), peak RSS (MB), status, stopped step,
# rank bounds. Needs python3 and GNU time (/usr/bin/time).
set -euo pipefail
cd "$(dirname "$0")/.."
bin=target/release/examples/descend
limits=("$@")
[ ${#limits[@]} -eq 0 ] && limits=(0.5)
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
python3 scripts/limits_cases.py > "$tmp/cases"
# a 100 MB line (item 8)
python3 -c "import sys; sys.stdout.write('0 0 0 ' + '7' * (100 * 2**20) + ' 0\n')" > "$tmp/long"
run() { # tag, input file, options...
    local tag=$1 file=$2; shift 2
    /usr/bin/time -v "$bin" --json "$@" < "$file" > "$tmp/out" 2> "$tmp/time"
    local wall rss
    wall=$(awk -F': ' '/Elapsed \(wall clock\)/ {print $2}' "$tmp/time")
    rss=$(awk -F': ' '/Maximum resident set size/ {printf "%.1f", $2/1024}' "$tmp/time")
    python3 - "$tag" "${*:-defaults}" "$wall" "$rss" "$tmp/out" <<'PY'
import json, sys
tag, opts, wall, rss, path = sys.argv[1:]
d = json.loads(open(path).read())
stop = (d.get("stopped") or {}).get("step")
print(f"{tag:9} {opts:15} {wall:>8} {rss:>7} MB  {d['status']:8} {str(stop):40} {d['rank_lower']}..{d['rank_upper']}")
PY
}
while IFS=$'\t' read -r tag line; do
    printf '%s\n' "$line" > "$tmp/line"
    run "$tag" "$tmp/line"
    for s in "${limits[@]}"; do run "$tag" "$tmp/line" --seconds "$s"; done
done < "$tmp/cases"
run item8 "$tmp/long"
