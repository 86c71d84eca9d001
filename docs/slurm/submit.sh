#!/bin/bash
# Submits the shard array, then the merge, which Slurm starts only after
# every array task has succeeded (afterok on the array's job ID).
# Run it from the folder that holds the scenario:
#   cd my-run && path/to/docs/slurm/submit.sh
set -euo pipefail

here=$(cd "$(dirname "$0")" && pwd)

if compgen -G 'parts/part-*.json' >/dev/null; then
    echo "submit.sh: parts/ already holds part files from an earlier run;" >&2
    echo "move them away (holdfast merge refuses to mix runs)." >&2
    exit 1
fi
mkdir -p parts

# --parsable prints "jobid" or "jobid;cluster".
array=$(sbatch --parsable "$here/assess-array.sbatch")
array=${array%%;*}
merge=$(sbatch --parsable --dependency=afterok:"$array" "$here/merge.sbatch")
merge=${merge%%;*}

echo "shards: job $array (array)   merge: job $merge (waits for every shard)"
echo "watch:  squeue -u \"\$USER\""
