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
import { writeFileAtomic } from "../io/atomic.js";
import type { SweepPlan } from "./plan.js";
import { writeSweepFiles } from "./runner.js";
import { UNHEX_FUNCTION, checkCluster, hexOf, isPlainPath, jobName, type ClusterResources } from "./slurm-values.js";

const SAFE_ENTRY = /^[A-Za-z0-9._+=^-]+$/;

function header(name: string, c: ClusterResources, extra: readonly string[]): string {
  return [
    "#!/bin/bash",
    `#SBATCH --job-name=${jobName(name)}`,
    ...(c.partition ? [`#SBATCH --partition=${c.partition}`] : []),
    `#SBATCH --time=${c.time}`,
    `#SBATCH --cpus-per-task=${c.cpus}`,
    `#SBATCH --mem=${c.memory}`,
    ...extra,
  ].join("\n");
}

/** Lines that send the script's output to `logs/NAME` when the folder could not go in an #SBATCH line. */
function logRedirect(plain: boolean, name: string): string {
  return plain ? "" : `mkdir -p "$SWEEP_DIR/logs" && exec >>"$SWEEP_DIR/logs/${name}.out" 2>>"$SWEEP_DIR/logs/${name}.err"\n`;
}

/** The part of both scripts that decodes the paths they need. */
function decodePaths(dir: string, bin: string): string {
  return (
    `${UNHEX_FUNCTION}\n` +
    `# the sweep folder, node and psibox, as hex-encoded data\n` +
    `unhex ${hexOf(dir)} SWEEP_DIR\n` +
    `unhex ${hexOf(process.execPath)} NODE\n` +
    `unhex ${hexOf(bin)} PSIBOX\n`
  );
}

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
${decodePaths(plan.dir, bin)}ENTRIES=(
${entries}
)
TASK="\${SLURM_ARRAY_TASK_ID:?run this script through sbatch, or set SLURM_ARRAY_TASK_ID}"
${logRedirect(plain, "task-$TASK")}DIR="$SWEEP_DIR/\${ENTRIES[$TASK]}"
if grep -q '"status": "completed"' "$DIR/summary.json" 2>/dev/null; then
  echo "entry \${ENTRIES[$TASK]} has already completed"
  exit 0
fi
if [ -f "$DIR/checkpoint.h5" ]; then
  exec "$NODE" "$PSIBOX" run --resume "$DIR" -q
fi
exec "$NODE" "$PSIBOX" run "$DIR/entry.toml" -q --force
`;
  const collect =
    header(`${name}-collect`, c, plain ? [`#SBATCH --output=${logs}/collect.out`] : []) +
    `
# Rebuild the sweep's summary once the array has finished: submit this script
# (collect.sbatch, beside sweep.sbatch) with sbatch --dependency=afterany:ARRAY_JOB_ID
set -euo pipefail
${decodePaths(plan.dir, bin)}${logRedirect(plain, "collect")}exec "$NODE" "$PSIBOX" sweep --summary "$SWEEP_DIR"
`;
  const manifest = ["task\tentry", ...plan.entries.map((e, i) => `${i}\t${e.name}`)].join("\n") + "\n";
  const paths = { script: path.join(plan.dir, "sweep.sbatch"), collect: path.join(plan.dir, "collect.sbatch"), manifest: path.join(plan.dir, "slurm-manifest.tsv") };
  writeFileAtomic(paths.script, script);
  writeFileAtomic(paths.collect, collect);
  writeFileAtomic(paths.manifest, manifest);
  fs.chmodSync(paths.script, 0o755);
  fs.chmodSync(paths.collect, 0o755);
  return paths;
}
