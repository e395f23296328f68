/**
 * A sweep as a Slurm job array: one array task per entry, each running
 * psibox run on its own entry config (or resuming it from its checkpoint),
 * with the resources of the [cluster] section, a throttle on tasks running at
 * once, and a log per task; plus a collect job that rebuilds the summary
 * once the array has finished (submit it with --dependency=afterany:JOBID).
 * Slurm does the scheduling; psibox only writes the scripts.
 */
import fs from "node:fs";
import path from "node:path";
import { writeFileAtomic } from "../io/atomic.js";
import type { SweepPlan } from "./plan.js";
import { writeSweepFiles } from "./runner.js";

function quote(s: string): string {
  return `'${s.replace(/'/g, `'\\''`)}'`;
}

/** Write sweep.sbatch, collect.sbatch and slurm-manifest.tsv into the sweep folder; returns their paths. */
export function emitSlurm(plan: SweepPlan, bin: string): { script: string; collect: string; manifest: string } {
  writeSweepFiles(plan);
  const c = plan.cluster;
  const logs = path.join(plan.dir, "logs");
  fs.mkdirSync(logs, { recursive: true });
  const node = process.execPath;
  const header = (name: string, extra: string[]) =>
    [
      "#!/bin/bash",
      `#SBATCH --job-name=${name}`,
      ...(c.partition ? [`#SBATCH --partition=${c.partition}`] : []),
      `#SBATCH --time=${c.time}`,
      `#SBATCH --cpus-per-task=${c.cpus}`,
      `#SBATCH --mem=${c.memory}`,
      ...extra,
    ].join("\n");
  const entries = plan.entries.map((e) => `  ${quote(path.join(plan.dir, e.name))}`).join("\n");
  const script =
    header(`psibox-${plan.name}`, [
      `#SBATCH --array=0-${plan.entries.length - 1}%${c.max_parallel}`,
      `#SBATCH --output=${path.join(logs, "task-%a.out")}`,
      `#SBATCH --error=${path.join(logs, "task-%a.err")}`,
    ]) +
    `
# psibox sweep "${plan.name}": ${plan.entries.length} entries, one array task each.
set -euo pipefail
ENTRIES=(
${entries}
)
TASK="\${SLURM_ARRAY_TASK_ID:?run this script through sbatch, or set SLURM_ARRAY_TASK_ID}"
DIR="\${ENTRIES[$TASK]}"
if grep -q '"status": "completed"' "$DIR/summary.json" 2>/dev/null; then
  echo "entry $DIR has already completed"
  exit 0
fi
if [ -f "$DIR/checkpoint.h5" ]; then
  exec ${quote(node)} ${quote(bin)} run --resume "$DIR" -q
fi
exec ${quote(node)} ${quote(bin)} run "$DIR/entry.toml" -q --force
`;
  const collect =
    header(`psibox-${plan.name}-collect`, [`#SBATCH --output=${path.join(logs, "collect.out")}`]) +
    `
# Rebuild the sweep's summary once the array has finished:
#   sbatch --dependency=afterany:ARRAY_JOB_ID ${path.join(plan.dir, "collect.sbatch")}
set -euo pipefail
exec ${quote(node)} ${quote(bin)} sweep --summary ${quote(plan.dir)}
`;
  const manifest = ["task\tentry\tfolder", ...plan.entries.map((e, i) => `${i}\t${e.name}\t${path.join(plan.dir, e.name)}`)].join("\n") + "\n";
  const paths = { script: path.join(plan.dir, "sweep.sbatch"), collect: path.join(plan.dir, "collect.sbatch"), manifest: path.join(plan.dir, "slurm-manifest.tsv") };
  writeFileAtomic(paths.script, script);
  writeFileAtomic(paths.collect, collect);
  writeFileAtomic(paths.manifest, manifest);
  fs.chmodSync(paths.script, 0o755);
  fs.chmodSync(paths.collect, 0o755);
  return paths;
}
