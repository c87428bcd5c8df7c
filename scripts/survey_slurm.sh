#!/usr/bin/env bash
# Family scan as a Slurm job array: array task K of N scans shard K/N.
#
# Submit (N = 16 shards, 4 cores each; the binary and OUTDIR on a file
# system every node sees):
#   cargo build --release --features parallel --example survey
#   jid=$(sbatch --parsable --array=1-16 --cpus-per-task=4 \
#         scripts/survey_slurm.sh runs/cong --family congruent --from 1 --to 1000000)
#   sbatch --dependency=afterok:$jid --wrap \
#     "SURVEY_MERGE=1 scripts/survey_slurm.sh runs/cong --family congruent --from 1 --to 1000000"
#
# Arguments: OUTDIR, then the FAMILY-OPTIONS of `survey scan` (the same in
# both calls). Environment:
#   SLURM_ARRAY_TASK_ID     shard number K (set by Slurm)
#   SLURM_ARRAY_TASK_COUNT  number of shards N (set by Slurm; override with
#                           SURVEY_SHARDS if the array has gaps, e.g. after
#                           resubmitting only some tasks with --array=3,7)
#   SLURM_CPUS_PER_TASK     threads per shard (default 1)
#   SURVEY                  survey binary (default target/release/examples/survey)
#   SURVEY_MERGE=1          instead of scanning, merge shard-1..N into
#                           OUTDIR/merged.jsonl and check completeness
#                           (needs SURVEY_SHARDS, or the N of the array via
#                           SLURM_ARRAY_TASK_COUNT)
#
# A task that hits its time limit or is preempted can simply be resubmitted
# with the same arguments: the shard file is resumed, not redone. Outside
# Slurm the script runs one shard when the variables above are set by hand.
#
#SBATCH --job-name=survey
#SBATCH --output=survey-%A_%a.out
#SBATCH --ntasks=1
#SBATCH --cpus-per-task=1
#SBATCH --time=04:00:00
set -euo pipefail

if [[ $# -lt 2 ]]; then
  echo "survey_slurm.sh: usage: survey_slurm.sh OUTDIR FAMILY-OPTIONS..." >&2; exit 2
fi
outdir=$1; shift
bin=${SURVEY:-target/release/examples/survey}
shards=${SURVEY_SHARDS:-${SLURM_ARRAY_TASK_COUNT:-}}
if [[ -z $shards ]]; then
  echo "survey_slurm.sh: number of shards unknown: run as an array job or set SURVEY_SHARDS" >&2; exit 2
fi
if [[ ! -x $bin ]]; then
  echo "survey_slurm.sh: survey binary '$bin' not found (set SURVEY)" >&2; exit 2
fi
mkdir -p "$outdir"

if [[ ${SURVEY_MERGE:-0} == 1 ]]; then
  files=()
  for k in $(seq 1 "$shards"); do files+=("$outdir/shard-$k-of-$shards.jsonl"); done
  exec "$bin" merge "$@" --out "$outdir/merged.jsonl" "${files[@]}"
fi

k=${SLURM_ARRAY_TASK_ID:?survey_slurm.sh: SLURM_ARRAY_TASK_ID is not set (submit with sbatch --array=1-N)}
threads=${SLURM_CPUS_PER_TASK:-1}
exec "$bin" scan "$@" --shard "$k/$shards" --threads "$threads" --quiet \
  --out "$outdir/shard-$k-of-$shards.jsonl"
