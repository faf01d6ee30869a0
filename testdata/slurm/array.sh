#!/bin/bash
# A Slurm job array that computes a fluctus job in shards, one array task
# per shard, each writing its checkpoint to OUT/shard-I. Submit it with
#
#   sbatch --array=1-8 array.sh JOB.yaml OUT
#
# (any number of tasks; the shard count is the array's task count). When
# every task has finished, combine the shards into OUT/result.json and
# OUT/result.csv with
#
#   fluctus merge OUT/shard-* --out OUT
#
# A task that is requeued or resubmitted with the same arguments resumes
# from its checkpoint. FLUCTUS names the binary (default: fluctus on PATH).
#SBATCH --job-name=fluctus
#SBATCH --cpus-per-task=1
#SBATCH --requeue
#SBATCH --output=fluctus-%A_%a.log
set -euo pipefail
job=${1:?usage: sbatch --array=1-N array.sh JOB.yaml OUT}
out=${2:?usage: sbatch --array=1-N array.sh JOB.yaml OUT}
"${FLUCTUS:-fluctus}" run "$job" --quiet \
    --threads "${SLURM_CPUS_PER_TASK:-1}" \
    --shard "$SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT" \
    --out "$out/shard-$SLURM_ARRAY_TASK_ID"
