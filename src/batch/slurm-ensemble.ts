/**
 * An ensemble as a Slurm job array: the folder is set up once, before the
 * array (its identity and config, by `psibox ensemble CONFIG --emit slurm`);
 * each of the array's tasks then advances its share of the members (member j
 * goes to task j mod tasks, the classical reference to task 0) into the
 * same folder, where every member is a file of its own, written atomically;
 * and a collect job, submitted with --dependency=afterany:JOBID, reduces the
 * members the folder holds. A task that is run again skips the members it
 * finished, so resubmitting the array after a failure adds only what is
 * missing. The resources, their checks and the script parts are the sweep's
 * (slurm-values.ts, slurm-script.ts).
 */
import fs from "node:fs";
import path from "node:path";
import { checkCluster, isPlainPath, jobName, type ClusterResources } from "./slurm-values.js";
import { decodePaths, logRedirect, sbatchHeader, writeScripts } from "./slurm-script.js";

/** Most array tasks of one ensemble. */
export const MAX_ENSEMBLE_TASKS = 100_000;

/** What the scripts of an ensemble's array need. */
export interface EnsembleArray {
  /** The run's name (the job name and the name of the tasks' config file). */
  readonly name: string;
  /** The ensemble folder, already set up. */
  readonly dir: string;
  /** The resolved config, with output.dir a full path. */
  readonly configText: string;
  readonly members: number;
  readonly tasks: number;
  readonly cluster: ClusterResources;
}

/** The command every task and the collect job run: psibox ensemble on the folder's config (its progress in the task's log). */
function command(extra: string): string {
  return `exec "$NODE" "$PSIBOX" ensemble "$ENSEMBLE_DIR/slurm/$CONFIG" ${extra.trimEnd()}\n`;
}

/** Write slurm/ensemble.sbatch, slurm/collect.sbatch and the tasks' config into the ensemble folder; returns the scripts' paths. */
export function emitEnsembleSlurm(a: EnsembleArray, bin: string): { script: string; collect: string } {
  const c = checkCluster(a.cluster);
  const slurm = path.join(a.dir, "slurm");
  const logs = path.join(slurm, "logs");
  fs.mkdirSync(logs, { recursive: true });
  const plain = isPlainPath(logs);
  const name = jobName(`psibox-${a.name}`);
  const config = `${jobName(a.name)}.toml`;
  const start = `set -euo pipefail\n${decodePaths("ENSEMBLE_DIR", "ensemble", a.dir, bin)}CONFIG='${config}'\n`;
  const script =
    sbatchHeader(name, c, [`#SBATCH --array=0-${a.tasks - 1}%${c.max_parallel}`, ...(plain ? [`#SBATCH --output=${logs}/task-%a.out`, `#SBATCH --error=${logs}/task-%a.err`] : [])]) +
    `
# psibox ensemble: ${a.members} members in ${a.tasks} array tasks (member j in task j mod ${a.tasks}, the classical
# reference in task 0), each added to the ensemble folder as a file of its own; finished members are skipped.
${start}TASK="\${SLURM_ARRAY_TASK_ID:?run this script through sbatch, or set SLURM_ARRAY_TASK_ID}"
${logRedirect(plain, "ENSEMBLE_DIR/slurm", "task-$TASK")}${command(`--task "$TASK" --tasks ${a.tasks} --workers ${c.cpus} `)}`;
  const collect =
    sbatchHeader(`${name}-collect`, c, plain ? [`#SBATCH --output=${logs}/collect.out`, `#SBATCH --error=${logs}/collect.err`] : []) +
    `
# Reduce the ensemble once the array has finished: submit this script (collect.sbatch, beside
# ensemble.sbatch) with sbatch --dependency=afterany:ARRAY_JOB_ID
${start}${logRedirect(plain, "ENSEMBLE_DIR/slurm", "collect")}${command("--reduce ")}`;
  const paths = { script: path.join(slurm, "ensemble.sbatch"), collect: path.join(slurm, "collect.sbatch") };
  writeScripts([
    { path: path.join(slurm, config), text: a.configText, executable: false },
    { path: paths.script, text: script, executable: true },
    { path: paths.collect, text: collect, executable: true },
  ]);
  return paths;
}
