/**
 * `psibox ensemble` on a cluster: which of its modes a call asks for (a
 * local run, emitting a Slurm array, one array task's share, the collect
 * step's reduction), and emitting the array: the folder is set up once,
 * here, before any task starts.
 */
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { InputError } from "../core/errors.js";
import { escapeControls, shellWord, shorten } from "../core/sanitize.js";
import { resolvedConfigToml } from "../config/serialize.js";
import type { ResolvedRun } from "../config/resolve.js";
import { prepareEnsemble } from "../ensemble/ensemble.js";
import { checkCluster } from "../batch/slurm-values.js";
import { DEFAULT_CLUSTER } from "../batch/slurm-script.js";
import { MAX_ENSEMBLE_TASKS, emitEnsembleSlurm } from "../batch/slurm-ensemble.js";
import { checkOutputFolder } from "../simulation/run-folder.js";
import { lockRunFolder } from "../simulation/run-lock.js";
import { silentReporter } from "../simulation/session.js";
import { TextReporter } from "./progress.js";

/** What a call of psibox ensemble does. */
export type Mode = { kind: "local" } | { kind: "emit"; tasks: number | undefined } | { kind: "task"; task: number; count: number } | { kind: "reduce" };

/** The flags that choose the mode. */
export interface ModeFlags {
  emit?: string;
  tasks?: string;
  task?: string;
  reduce: boolean;
}

function countOf(option: string, text: string, lo: number, hi: number): number {
  const n = Number(text);
  if (!(text.trim() !== "" && Number.isInteger(n) && n >= lo && n <= hi)) throw new InputError(`${option}: must be a whole number from ${lo} to ${hi}, got ${shorten(text)}`);
  return n;
}

/** The mode of the flags, or a one-line error for a combination that means nothing. */
export function modeOf(flags: ModeFlags): Mode {
  const chosen = [flags.emit !== undefined && "--emit", flags.task !== undefined && "--task", flags.reduce && "--reduce"].filter((x): x is string => x !== false);
  if (chosen.length > 1) throw new InputError(`${chosen.join(" and ")}: give one of them (emit an array, run one of its tasks, or reduce)`);
  if (flags.emit !== undefined && flags.emit !== "slurm") throw new InputError(`--emit: the only target is "slurm", got "${shorten(flags.emit)}"`);
  const tasks = flags.tasks === undefined ? undefined : countOf("--tasks", flags.tasks, 1, MAX_ENSEMBLE_TASKS);
  if (flags.emit !== undefined) return { kind: "emit", tasks };
  if (flags.task !== undefined) {
    if (tasks === undefined) throw new InputError("--task: needs --tasks, the number of tasks sharing the members");
    return { kind: "task", task: countOf("--task", flags.task, 0, tasks - 1), count: tasks };
  }
  if (tasks !== undefined) throw new InputError("--tasks: goes with --emit slurm or --task");
  return flags.reduce ? { kind: "reduce" } : { kind: "local" };
}

/** The CLI entry script (dist/cli/bin.js). */
function binPath(): string {
  return path.resolve(path.dirname(fileURLToPath(import.meta.url)), "bin.js");
}

/** psibox ensemble CONFIG --emit slurm: check [cluster], set the folder up, write the scripts; returns the exit code. */
export async function emitCommand(run: ResolvedRun, flags: { force: boolean; quiet: boolean }, tasks: number | undefined): Promise<number> {
  const cluster = checkCluster(run.config.cluster ?? DEFAULT_CLUSTER);
  const dir = checkOutputFolder(path.join(run.outputDir, "ensemble"));
  fs.mkdirSync(dir, { recursive: true });
  const lock = lockRunFolder(dir);
  try {
    const reporter = flags.quiet ? silentReporter : new TextReporter();
    const { settings, kept } = await prepareEnsemble(run, { force: flags.force, dir, reporter });
    const count = Math.min(settings.members, tasks ?? cluster.max_parallel);
    const files = emitEnsembleSlurm({ name: run.name, dir, configText: resolvedConfigToml(run), members: settings.members, tasks: count, cluster }, binPath());
    const rel = (p: string): string => path.relative(process.cwd(), p);
    process.stdout.write(
      `wrote a Slurm array of ${count} task${count === 1 ? "" : "s"} for ${settings.members} members${kept > 0 ? ` (${kept} kept)` : ""}: ${escapeControls(rel(files.script))}\n` +
        `submit:  jobid=$(sbatch --parsable ${shellWord(rel(files.script))}) && sbatch --dependency=afterany:$jobid ${shellWord(rel(files.collect))}\n`,
    );
    return 0;
  } finally {
    lock.release();
  }
}
