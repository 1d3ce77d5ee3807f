#!/usr/bin/env bash
# A chamber map as a Slurm job array: each array task computes one share
# of the grid (`wallflower scan --shard K/N`) into PARTS/part-K.jsonl; the
# shares are then joined into the file a single run would write.
#
# On the cluster (from the folder that should hold the results):
#
#   sbatch --array=1-16 scripts/slurm-scan.sh \
#       scenarios/su2-pure.ron --param u --re -3..3 --im -3..3 --grid 256x256 --reach 40
#   squeue --me                              # wait until the array is done
#   wallflower scan merge parts -o map.jsonl --summary map.json --plot map.svg
#
# The arguments after the script are those of `wallflower scan` (without
# -o, --shard and --threads, which this script sets). Array indices are the
# share numbers 1..N. A task that failed or was pre-empted is submitted
# again with the number of shares given, and continues its share where it
# stopped:
#
#   SHARDS=16 sbatch --array=5 scripts/slurm-scan.sh <the same arguments>
#
# Environment: WALLFLOWER (the binary, default `wallflower` on PATH), PARTS
# (the folder, default `parts`), SHARDS (default: the array's last index).
#
#SBATCH --job-name=wallflower-scan
#SBATCH --array=1-4
#SBATCH --cpus-per-task=2
#SBATCH --output=wallflower-scan-%A_%a.log
set -euo pipefail

WALLFLOWER="${WALLFLOWER:-wallflower}"
PARTS="${PARTS:-parts}"
if [ -z "${SLURM_ARRAY_TASK_ID:-}" ]; then
    echo "run this with sbatch --array=1-N (it computes share K of N of the grid)" >&2
    exit 2
fi
k="$SLURM_ARRAY_TASK_ID"
n="${SHARDS:-${SLURM_ARRAY_TASK_MAX:-$k}}"
if [ "$#" -eq 0 ]; then
    set -- scenarios/su2-pure.ron --param u --re -3..3 --im -3..3 --grid 128x128 --reach 40
fi
mkdir -p "$PARTS"
exec "$WALLFLOWER" scan "$@" --shard "$k/$n" --threads "${SLURM_CPUS_PER_TASK:-1}" \
    -o "$PARTS/part-$k.jsonl"
