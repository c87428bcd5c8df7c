#!/usr/bin/env bash
# usage: scripts/same_outputs.sh BEFORE_EXAMPLES_DIR AFTER_EXAMPLES_DIR
# Runs the examples selmer_census, survey and descend of two builds (e.g.
# target/release/examples of two checkouts) on the same work and compares
# their outputs with the timing lines stripped; prints "same:" or "DIFFER:"
# per command and exits non-zero on any difference. Needs python3 with
# sympy (scripts/compare_curves.py writes the curves for `descend --json`).
set -u
B=$1; A=$2; T=$(mktemp -d); rc=0
CURVES=$T/curves.txt
python3 "$(dirname "$0")/compare_curves.py" > "$CURVES"
strip() { sed -E 's/, [0-9.]+ s, [0-9.]+ curves\/s//'; }
for args in "box:30 first" "box:30 isogeny-selmer" "3000 local-only" "3000 isogeny-selmer" "1000 first" "300 full" "box:10 full"; do
  $B/selmer_census $args 2>&1 | strip > $T/b.txt
  $A/selmer_census $args 2>&1 | strip > $T/a.txt
  if cmp -s $T/b.txt $T/a.txt; then echo "same: selmer_census $args"; else echo "DIFFER: selmer_census $args"; diff $T/b.txt $T/a.txt | head; rc=1; fi
done
for fam in "--family congruent --from 1 --to 400" "--family box --bound 12"; do
  rm -f $T/sb.jsonl $T/sa.jsonl
  $B/survey scan $fam --out $T/sb.jsonl --threads 1 --quiet >/dev/null 2>&1
  $A/survey scan $fam --out $T/sa.jsonl --threads 1 --quiet >/dev/null 2>&1
  if cmp -s $T/sb.jsonl $T/sa.jsonl; then echo "same: survey scan $fam ($(wc -l < $T/sa.jsonl) lines)"; else echo "DIFFER: survey scan $fam"; rc=1; fi
done
for flags in "--skip-coverings --all-evidence" "--all-evidence"; do
  $B/descend --json $flags < "$CURVES" > $T/db.jsonl 2>&1
  $A/descend --json $flags < "$CURVES" > $T/da.jsonl 2>&1
  if cmp -s $T/db.jsonl $T/da.jsonl; then echo "same: descend --json $flags ($(wc -l < $T/da.jsonl) curves)"; else echo "DIFFER: descend --json $flags"; rc=1; fi
done
rm -rf $T; exit $rc
