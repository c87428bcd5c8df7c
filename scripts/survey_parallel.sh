#!/usr/bin/env bash
# Family scan split into shards and run by GNU parallel — on this machine,
# or on any machines reachable over ssh — then merged and checked.
#
# usage:
#   scripts/survey_parallel.sh -o OUTDIR [-n SHARDS] [-j JOBS] [-t THREADS]
#                              [-S SSHLOGINFILE] [-b SURVEY-BINARY] -- FAMILY-OPTIONS...
#
#   -o OUTDIR         where shard-K-of-N.jsonl, shard-K-of-N.log, merged.jsonl
#                     and joblog go (created if missing)
#   -n SHARDS         number of shards N (default 4)
#   -j JOBS           shards run at once per machine (default: one per core)
#   -t THREADS        --threads for each shard (default 1: the parallelism
#                     comes from the shards)
#   -S SSHLOGINFILE   machines to use, one ssh login per line (GNU parallel's
#                     --sshloginfile; ':' stands for this machine). The survey
#                     binary and OUTDIR must be at the same absolute paths on
#                     every machine (a shared file system).
#   -b SURVEY-BINARY  default target/release/examples/survey (build it with
#                     cargo build --release --features parallel --example survey)
#   FAMILY-OPTIONS    as for `survey scan`, e.g.
#                     --family congruent --from 1 --to 100000 --height 64
#
# Example:
#   scripts/survey_parallel.sh -o runs/cong -n 8 -- --family congruent --from 1 --to 100000
#
# Rerunning the same command after an interruption resumes every shard where
# it stopped (each shard file is append-only with a partial-line check), and
# the merge step checks that every member of the family is there exactly once.
set -euo pipefail

outdir= shards=4 jobs=100% threads=1 sshloginfile= bin=target/release/examples/survey
while getopts "o:n:j:t:S:b:h" opt; do
  case $opt in
    o) outdir=$OPTARG ;;
    n) shards=$OPTARG ;;
    j) jobs=$OPTARG ;;
    t) threads=$OPTARG ;;
    S) sshloginfile=$OPTARG ;;
    b) bin=$OPTARG ;;
    h) sed -n '2,/^set -euo/p' "$0" | sed '$d'; exit 0 ;;
    *) echo "survey_parallel.sh: see -h" >&2; exit 2 ;;
  esac
done
shift $((OPTIND - 1))
[[ ${1-} == -- ]] && shift
family=("$@")

if [[ -z $outdir || ${#family[@]} -eq 0 ]]; then
  echo "survey_parallel.sh: need -o OUTDIR and FAMILY-OPTIONS after --" >&2; exit 2
fi
if ! [[ $shards =~ ^[1-9][0-9]*$ ]]; then
  echo "survey_parallel.sh: -n needs a positive integer, got '$shards'" >&2; exit 2
fi
if ! command -v parallel >/dev/null 2>&1; then
  echo "survey_parallel.sh: GNU parallel is not installed (Debian/Ubuntu: apt-get install parallel)" >&2
  exit 127
fi
if [[ ! -x $bin ]]; then
  echo "survey_parallel.sh: survey binary '$bin' not found; build it with" >&2
  echo "  cargo build --release --features parallel --example survey" >&2
  exit 2
fi

mkdir -p "$outdir"
bin=$(realpath "$bin")
outdir=$(realpath "$outdir")

# One shell command per shard; {} is the shard number k. Every argument is
# quoted with printf %q so family options with blanks (a --curve) survive
# the trip through the shell, locally or over ssh.
printf -v famq '%q ' "${family[@]}"
printf -v binq '%q' "$bin"
printf -v dirq '%q' "$outdir"
cmd="$binq scan $famq --shard {}/$shards --threads $threads --quiet"
cmd+=" --out $dirq/shard-{}-of-$shards.jsonl > $dirq/shard-{}-of-$shards.log 2>&1"

where=()
[[ -n $sshloginfile ]] && where=(--sshloginfile "$sshloginfile")
bar=()
[[ -t 2 ]] && bar=(--bar)

status=0
seq 1 "$shards" | parallel --will-cite -j "$jobs" "${where[@]}" "${bar[@]}" \
  --joblog "$outdir/joblog" "$cmd" || status=$?
if [[ $status -ne 0 ]]; then
  echo "survey_parallel.sh: $status shard job(s) failed; see $outdir/joblog and the .log files." >&2
  echo "Rerun the same command to resume them." >&2
  exit 1
fi

files=()
for k in $(seq 1 "$shards"); do files+=("$outdir/shard-$k-of-$shards.jsonl"); done
"$bin" merge "${family[@]}" --out "$outdir/merged.jsonl" "${files[@]}"
