#!/usr/bin/env bash
# Slurm job array: one array task per shard of the survey, then a dependent merge job.
#
#   sbatch --array=1-16 deploy/slurm-survey.sh DEM OUTDIR [DIAMETER_RANGE] [MEMORY] [TILE_PX]
#   sbatch --dependency=afterok:<ARRAY_JOB_ID> --wrap \
#       "quietbowl merge OUTDIR/part-*.json --out OUTDIR/survey.json"
#
# DIAMETER_RANGE defaults to 1000..2000 (metres), MEMORY (the survey's working-memory cap) to
# 3G, TILE_PX (the tile core size) to the survey's own default. The requests below suit a large node; override them on the sbatch line (--cpus-per-task,
# --mem), keeping --mem a little above MEMORY. `quietbowl` must be on the jobs' PATH
# (`--export=ALL,PATH=...`). scripts/cluster-check.sh runs this on a single-node Slurm.
#
#SBATCH --job-name=quietbowl-survey
#SBATCH --cpus-per-task=8
#SBATCH --mem=4G
#SBATCH --time=24:00:00
set -euo pipefail
dem=$1
outdir=$2
range=${3:-1000..2000}
memory=${4:-3G}
tile=()
[ -n "${5:-}" ] && tile=(--tile "$5")
n=${SLURM_ARRAY_TASK_COUNT:?run this as a job array (sbatch --array=1-N)}
k=${SLURM_ARRAY_TASK_ID:?}
mkdir -p "$outdir"
# Every task must use the same survey parameters; the merge refuses parts that differ.
# A task that is preempted and requeued resumes from its checkpoint beside the output.
exec quietbowl survey "$dem" --diameter "$range" --memory "$memory" "${tile[@]}" \
    --shard "$k/$n" --out "$outdir/part-$k.json"
