#!/usr/bin/env bash
# Slurm job array: one array task per shard of the survey, then a dependent merge job.
#
#   sbatch --array=1-16 deploy/slurm-survey.sh /data/farside-mosaic.vrt /scratch/survey
#   sbatch --dependency=afterok:<ARRAY_JOB_ID> --wrap \
#       "quietbowl merge /scratch/survey/part-*.json --out /scratch/survey/survey.json"
#
#SBATCH --job-name=quietbowl-survey
#SBATCH --cpus-per-task=8
#SBATCH --mem=4G
#SBATCH --time=24:00:00
set -euo pipefail
dem=$1
outdir=$2
n=${SLURM_ARRAY_TASK_COUNT:?run this as a job array (sbatch --array=1-N)}
k=${SLURM_ARRAY_TASK_ID:?}
mkdir -p "$outdir"
# Every task must use the same survey parameters; the merge refuses parts that differ.
# A task that is preempted and requeued resumes from its checkpoint beside the output.
exec quietbowl survey "$dem" --diameter 1000..2000 --memory 3G \
    --shard "$k/$n" --out "$outdir/part-$k.json"
