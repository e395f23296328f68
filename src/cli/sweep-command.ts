/** `psibox sweep CONFIG` (local pool), `--emit slurm`, and `--summary DIR`. */
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { InputError } from "../core/errors.js";
import { escapeControls, shellWord, shorten } from "../core/sanitize.js";
import { applyOverrides, readTomlFile } from "../config/load.js";
import { planSweep } from "../batch/plan.js";
import { runSweep } from "../batch/runner.js";
import { emitSlurm } from "../batch/slurm.js";
import { entriesText, writeSummary } from "../batch/summary.js";
import { prepareSweepFolder } from "../batch/sweep-folder.js";

export interface SweepFlags {
  set: string[];
  workers?: string;
  emit?: string;
  summary?: string;
  force: boolean;
}

/** The CLI entry script (dist/cli/bin.js). */
function binPath(): string {
  return path.resolve(path.dirname(fileURLToPath(import.meta.url)), "bin.js");
}

/** Run, emit or summarise a sweep; returns the exit code. */
export async function sweepCommand(configFile: string | undefined, flags: SweepFlags): Promise<number> {
  if (flags.summary !== undefined) {
    if (configFile !== undefined) throw new InputError("give either a config file or --summary DIR, not both");
    const rows = writeSummary(path.resolve(flags.summary));
    const counts = rows.reduce<Record<string, number>>((acc, r) => ({ ...acc, [String(r["status"])]: (acc[String(r["status"])] ?? 0) + 1 }), {});
    process.stdout.write(`${entriesText(rows.length)} (${Object.entries(counts).map(([k, v]) => `${v} ${k}`).join(", ")}); wrote sweep-summary.csv and sweep-summary.json in ${flags.summary}\n`);
    return 0;
  }
  if (configFile === undefined) throw new InputError("give a sweep config (psibox sweep CONFIG) or --summary DIR");
  const raw = applyOverrides(readTomlFile(configFile), flags.set);
  const plan = planSweep(raw, path.basename(configFile).replace(/\.[^.]*$/, ""), process.cwd());
  const where = escapeControls(path.relative(process.cwd(), plan.dir) || ".");
  for (const note of prepareSweepFolder(plan, flags.force)) process.stderr.write(`psibox: ${escapeControls(note)}\n`);
  if (flags.emit !== undefined) {
    if (flags.emit !== "slurm") throw new InputError(`--emit: the only target is "slurm", got "${shorten(flags.emit)}"`);
    const files = emitSlurm(plan, binPath());
    process.stdout.write(
      `wrote a Slurm array of ${plan.entries.length} task${plan.entries.length === 1 ? "" : "s"}: ${escapeControls(path.relative(process.cwd(), files.script))}\n` +
        `submit:  jobid=$(sbatch --parsable ${shellWord(path.relative(process.cwd(), files.script))}) && sbatch --dependency=afterany:$jobid ${shellWord(path.relative(process.cwd(), files.collect))}\n`,
    );
    return 0;
  }
  const workers = flags.workers === undefined ? os.availableParallelism() : Number(flags.workers);
  if (!(Number.isInteger(workers) && workers >= 1)) throw new InputError(`--workers: must be a whole number ≥ 1, got ${flags.workers}`);
  process.stderr.write(`psibox sweep "${escapeControls(plan.name)}": ${entriesText(plan.entries.length)} (${plan.combine} of ${plan.keys.join(", ")}), ${workers} worker${workers === 1 ? "" : "s"}, in ${where}\n`);
  const result = await runSweep(plan, binPath(), workers, { line: (t) => process.stderr.write(`  ${t}\n`) });
  process.stdout.write(
    `sweep done: ${result.completed} completed, ${result.skipped} already done,${result.elsewhere > 0 ? ` ${result.elsewhere} being run by another process,` : ""} ${result.failed} failed; summary in ${where}/sweep-summary.csv\n`,
  );
  return result.failed > 0 ? 3 : 0;
}
