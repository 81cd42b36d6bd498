// Slurm job scripts for a shot: an array job whose task K renders shard K of N, and a verify job
// that runs after the whole array (afterany, so it reports even when a task failed). The scheduler
// is the cluster's own; straylight only writes its scripts.

import path from 'node:path';

export interface SlurmPlan {
  shotFile: string;
  tasks: number;
  jobsPerTask: number;
  folder: string;
  partition?: string;
  /** the node executable and straylight's launcher, absolute */
  node: string;
  bin: string;
}

const q = (s: string) => `'${s.replace(/'/g, `'\\''`)}'`;

export function slurmScripts(p: SlurmPlan): { render: string; verify: string; submit: string } {
  const name = path.basename(p.shotFile).replace(/\.ya?ml$/i, '');
  const part = p.partition ? `#SBATCH --partition=${p.partition}\n` : '';
  const render = `#!/bin/bash
#SBATCH --job-name=straylight-render-${name}
#SBATCH --array=0-${p.tasks - 1}
#SBATCH --cpus-per-task=${p.jobsPerTask}
#SBATCH --output=${p.folder}/render-%A_%a.log
${part}# task K of the array renders shard K/${p.tasks}: frames whose index from the first is K mod ${p.tasks}
set -euo pipefail
exec ${q(p.node)} ${q(p.bin)} render ${q(p.shotFile)} --shard "\${SLURM_ARRAY_TASK_ID}/${p.tasks}" --jobs ${p.jobsPerTask} --progress json
`;
  const verify = `#!/bin/bash
#SBATCH --job-name=straylight-verify-${name}
#SBATCH --output=${p.folder}/verify-%j.log
${part}# checks that every frame is present and intact against the shards' manifests, then screens
# the whole sequence for flashing (the shards could not: each saw every Nth frame)
set -uo pipefail
${q(p.node)} ${q(p.bin)} verify ${q(p.shotFile)}
status=$?
[ "$status" -eq 0 ] && ${q(p.node)} ${q(p.bin)} flashes ${q(p.shotFile)}
exit $status
`;
  const submit = `#!/bin/bash
# submits the render array, then the verify job to run after it
set -euo pipefail
cd ${q(p.folder)}
render=$(sbatch --parsable render.sbatch)
render=\${render%%;*}
verify=$(sbatch --parsable --dependency=afterany:\${render} verify.sbatch)
echo "render job \${render} (array of ${p.tasks}), verify job \${verify%%;*}"
`;
  return { render, verify, submit };
}
