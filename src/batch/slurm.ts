/**
 * A sweep as a Slurm job array: one array task per entry, each running
 * psibox run on its own entry config (or resuming it from its checkpoint),
 * with the resources of the [cluster] section, a throttle on tasks running at
 * once, and a log per task; plus a collect job that rebuilds the summary
 * once the array has finished (submit it with --dependency=afterany:JOBID).
 * Slurm does the scheduling; psibox only writes the scripts.
 *
 * Nothing from a config reaches the scripts as text that bash or sbatch could
 * act on: resources are checked against Slurm's syntax (slurm-values.ts),
 * entry names are slugs, and paths are hex data decoded when the task runs.
 */
import fs from "node:fs";
import path from "node:path";
import type { SweepPlan } from "./plan.js";
import { writeSweepFiles } from "./runner.js";
import { checkCluster, isPlainPath, jobName } from "./slurm-values.js";
import { decodePaths, logRedirect, sbatchHeader as header, writeScripts } from "./slurm-script.js";

const SAFE_ENTRY = /^[A-Za-z0-9._+=^-]+$/;

/** Write sweep.sbatch, collect.sbatch and slurm-manifest.tsv into the sweep folder; returns their paths. */
export function emitSlurm(plan: SweepPlan, bin: string): { script: string; collect: string; manifest: string } {
  const c = checkCluster(plan.cluster);
  for (const e of plan.entries) if (!SAFE_ENTRY.test(e.name)) throw new Error(`sweep entry name ${JSON.stringify(e.name)} is not a plain folder name`);
  writeSweepFiles(plan);
  const logs = path.join(plan.dir, "logs");
  fs.mkdirSync(logs, { recursive: true });
  const plain = isPlainPath(logs);
  const name = jobName(`psibox-${plan.name}`);
  const entries = plan.entries.map((e) => `  '${e.name}'`).join("\n");
  const script =
    header(name, c, [
      `#SBATCH --array=0-${plan.entries.length - 1}%${c.max_parallel}`,
      ...(plain ? [`#SBATCH --output=${logs}/task-%a.out`, `#SBATCH --error=${logs}/task-%a.err`] : []),
    ]) +
    `
# psibox sweep: ${plan.entries.length} entries, one array task each.
set -euo pipefail
${decodePaths("SWEEP_DIR", "sweep", plan.dir, bin)}ENTRIES=(
${entries}
)
TASK="\${SLURM_ARRAY_TASK_ID:?run this script through sbatch, or set SLURM_ARRAY_TASK_ID}"
${logRedirect(plain, "SWEEP_DIR", "task-$TASK")}DIR="$SWEEP_DIR/\${ENTRIES[$TASK]}"
if grep -q '"status": "completed"' "$DIR/summary.json" 2>/dev/null; then
  echo "entry \${ENTRIES[$TASK]} has already completed"
  exit 0
fi
# not quiet: the task's log shows the run's progress (a line at every tenth of its span) and its warnings
if [ -f "$DIR/checkpoint.h5" ]; then
  exec "$NODE" "$PSIBOX" run --resume "$DIR"
fi
exec "$NODE" "$PSIBOX" run "$DIR/entry.toml" --force
`;
  const collect =
    header(`${name}-collect`, c, plain ? [`#SBATCH --output=${logs}/collect.out`] : []) +
    `
# Rebuild the sweep's summary once the array has finished: submit this script
# (collect.sbatch, beside sweep.sbatch) with sbatch --dependency=afterany:ARRAY_JOB_ID
set -euo pipefail
${decodePaths("SWEEP_DIR", "sweep", plan.dir, bin)}${logRedirect(plain, "SWEEP_DIR", "collect")}exec "$NODE" "$PSIBOX" sweep --summary "$SWEEP_DIR"
`;
  const manifest = ["task\tentry", ...plan.entries.map((e, i) => `${i}\t${e.name}`)].join("\n") + "\n";
  const paths = { script: path.join(plan.dir, "sweep.sbatch"), collect: path.join(plan.dir, "collect.sbatch"), manifest: path.join(plan.dir, "slurm-manifest.tsv") };
  writeScripts([
    { path: paths.script, text: script, executable: true },
    { path: paths.collect, text: collect, executable: true },
    { path: paths.manifest, text: manifest, executable: false },
  ]);
  return paths;
}
