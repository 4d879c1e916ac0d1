#!/bin/bash
# Runs a cvdeck sweep as a Slurm job array, one shard per array task.
#
#   sbatch --array=1-8 sweep-array.sh SWEEP.yaml OUTDIR
#   cvdeck sweep merge OUTDIR          # after the array has finished
#
# Every task writes its decks and OUTDIR/summary-shard-K-of-N.{csv,json}
# into the same OUTDIR (on a file system all nodes share); the shards never
# write the same deck. Tasks skip the decks already built, so after a
# failure the same array can simply be submitted again (all of it: the
# shard count is the array's task count).
#SBATCH --job-name=cvdeck-sweep
#SBATCH --cpus-per-task=1
#SBATCH --output=slurm-%A_%a.out
set -euo pipefail

if [ $# -ne 2 ]; then
	echo "usage: sbatch --array=1-N $0 SWEEP.yaml OUTDIR" >&2
	exit 2
fi

cvdeck sweep "$1" -o "$2" -j "${SLURM_CPUS_PER_TASK:-1}" --quiet \
	--shard "${SLURM_ARRAY_TASK_ID}/${SLURM_ARRAY_TASK_COUNT}"
