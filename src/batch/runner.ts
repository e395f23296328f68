/**
 * Running a sweep locally: a pool of child processes (psibox run), one per
 * entry, `workers` at a time. Completed entries are skipped, entries with a
 * checkpoint are resumed, failures are recorded and the others go on. Each
 * child is told its parent's pid and stops at its next step (writing a
 * checkpoint) if the sweep itself is killed, so that re-running the sweep
 * resumes it cleanly.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { stringify } from "smol-toml";
import { writeFileAtomic } from "../io/atomic.js";
import { escapeControls } from "../core/sanitize.js";
import type { SweepPlan } from "./plan.js";
import { entryStatus, writeSummary, type SweepManifest } from "./summary.js";
import { EntryProgress } from "./entry-progress.js";

/** How a sweep reports progress. */
export interface SweepReporter {
  line(text: string): void;
}

/** Write the sweep's manifest and one entry.toml per entry folder. */
export function writeSweepFiles(plan: SweepPlan): void {
  fs.mkdirSync(plan.dir, { recursive: true });
  const manifest: SweepManifest = { name: plan.name, keys: plan.keys, combine: plan.combine, entries: plan.entries.map((e) => ({ name: e.name, values: e.values })) };
  writeFileAtomic(path.join(plan.dir, "sweep.json"), JSON.stringify(manifest, null, 2) + "\n");
  for (const e of plan.entries) {
    const dir = path.join(plan.dir, e.name);
    fs.mkdirSync(dir, { recursive: true });
    writeFileAtomic(path.join(dir, "entry.toml"), `# psibox sweep "${escapeControls(plan.name)}", entry ${e.name}\n${stringify(e.config)}\n`);
  }
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/**
 * Wait for the run a killed sweep left in `dir` to stop (it notices its sweep is gone at its next step and writes
 * a checkpoint). `.running` holds that run's pid and its sweep's; a run whose sweep is alive belongs to another
 * sweep running now, and is left alone (its folder's lock then says the entry is running).
 */
async function waitForStaleRun(dir: string): Promise<void> {
  const lock = path.join(dir, ".running");
  const start = Date.now();
  while (fs.existsSync(lock)) {
    const [pid, sweep] = fs.readFileSync(lock, "utf8").split(" ").map(Number);
    if (sweep !== undefined && sweep !== process.pid && sweep > 0 && alive(sweep) && pid! > 0 && alive(pid!)) return;
    if (!(pid! > 0) || !alive(pid!) || Date.now() - start > 120_000) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  fs.rmSync(lock, { force: true });
}

/** Run every entry not yet completed; returns the counts. */
export async function runSweep(plan: SweepPlan, bin: string, workers: number, reporter: SweepReporter): Promise<{ completed: number; failed: number; skipped: number; elsewhere: number }> {
  writeSweepFiles(plan);
  const queue = [...plan.entries];
  let completed = 0;
  let failed = 0;
  let skipped = 0;
  let elsewhere = 0;
  let done = 0;
  const total = plan.entries.length;
  const runOne = async (entry: SweepPlan["entries"][number]): Promise<void> => {
    const dir = path.join(plan.dir, entry.name);
    await waitForStaleRun(dir);
    const before = entryStatus(dir);
    if (before.status === "completed" || before.status === "running") {
      if (before.status === "completed") skipped++;
      else elsewhere++;
      done++;
      // an entry another process is running (another sweep, a Slurm task) is left to it
      reporter.line(`[${done}/${total}] ${entry.name}: ${before.status === "completed" ? "already completed" : `being run by ${before.reason}; left to it`}`);
      return;
    }
    fs.rmSync(path.join(dir, "sweep-status.json"), { force: true });
    const resume = fs.existsSync(path.join(dir, "checkpoint.h5"));
    // not quiet: the run's progress and warnings come through its stderr (EntryProgress)
    const args = resume ? [bin, "run", "--resume", dir] : [bin, "run", path.join(dir, "entry.toml"), "--force"];
    const started = Date.now();
    const child = spawn(process.execPath, args, { stdio: ["ignore", "ignore", "pipe"], env: { ...process.env, PSIBOX_PARENT_PID: String(process.pid), PSIBOX_THREADS: process.env["PSIBOX_THREADS"] ?? "1" } });
    fs.writeFileSync(path.join(dir, ".running"), `${child.pid ?? 0} ${process.pid}`);
    const progress = new EntryProgress(entry.name, started / 1000);
    child.stderr.on("data", (d: Buffer) => {
      for (const line of progress.take(d.toString(), Date.now() / 1000)) reporter.line(line);
    });
    const code: number = await new Promise((resolve) => child.on("close", (c) => resolve(c ?? 1)));
    fs.rmSync(path.join(dir, ".running"), { force: true });
    done++;
    const after = entryStatus(dir);
    const seconds = ((Date.now() - started) / 1000).toFixed(1);
    if (code === 0 && after.status === "completed") {
      completed++;
      reporter.line(`[${done}/${total}] ${entry.name}: completed${resume ? " (resumed)" : ""} in ${seconds} s`);
      return;
    }
    failed++;
    const reason = after.reason ?? progress.reason ?? `exit code ${code}`;
    writeFileAtomic(path.join(dir, "sweep-status.json"), JSON.stringify({ status: code === 130 ? "interrupted" : "failed", reason, exit_code: code }, null, 2) + "\n");
    reporter.line(`[${done}/${total}] ${entry.name}: ${code === 130 ? "interrupted" : "failed"}: ${reason}`);
  };
  const pool = Array.from({ length: Math.max(1, Math.min(workers, total)) }, async () => {
    for (let next = queue.shift(); next; next = queue.shift()) await runOne(next);
  });
  await Promise.all(pool);
  writeSummary(plan.dir);
  return { completed, failed, skipped, elsewhere };
}
