/**
 * Runs of a resolved config in a test, through the application's runSimulation: a fresh folder (or a
 * resume), and an optional stop after a number of steps, counted by a plug-in.
 */
import { prepareOutputDir, type RunSummary } from "../../src/simulation/run.js";
import { runSimulation } from "../../src/app/run.js";
import type { ResolvedRun } from "../../src/config/resolve.js";
import type { RunPlugin } from "../../src/simulation/plugin.js";

/** Run `run` (afresh, or `resume`), stopping after `stopAfter` steps when given. */
export async function runStoppable(run: ResolvedRun, options: { resume?: boolean; stopAfter?: number } = {}): Promise<RunSummary> {
  if (!options.resume) prepareOutputDir(run.outputDir, true);
  let steps = 0;
  const counter: RunPlugin = { name: "counter", afterStep: () => void steps++ };
  const stop = options.stopAfter;
  return runSimulation(run, {
    plugins: [counter],
    ...(options.resume ? { resume: true } : {}),
    ...(stop !== undefined ? { stopRequested: () => (steps >= stop ? "stopped by the test" : undefined) } : {}),
  });
}
