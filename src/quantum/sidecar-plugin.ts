/**
 * The quantum sidecar as a run plug-in: it asks for the step's kinetic sum
 * and the field's moments, runs the clocks (tracker.ts), adds its columns to
 * the time series, writes clocks.json at the end and puts the clocks'
 * verdicts into summary.json ("clocks"), and keeps its running state in
 * checkpoints.
 */
import { writeFileAtomic } from "../io/atomic.js";
import type { RunContext, RunPlugin, StartFacts, StepFacts } from "../simulation/plugin.js";
import { runPaths } from "../simulation/outputs.js";
import { SidecarTracker } from "./tracker.js";
import { SIDECAR_COLUMNS, clocksRecord, sidecarRow } from "./sidecar-report.js";

/** The sidecar plug-in; `squeezingDb` is the squeezing level to time (sidecar.squeezing_db). */
export function sidecarPlugin(squeezingDb: number): RunPlugin {
  let context: RunContext | undefined;
  let tracker: SidecarTracker | undefined;
  let saved: Parameters<SidecarTracker["restore"]>[0] | undefined;
  const running = (): SidecarTracker => {
    if (!tracker) throw new Error("the sidecar plug-in was called before start()");
    return tracker;
  };
  return {
    name: "sidecar",
    stateVersion: 1,
    measures: ["kinetic", "moments"],
    columns: SIDECAR_COLUMNS,
    start(ctx: RunContext, facts: StartFacts) {
      context = ctx;
      const start = { sums: facts.sums.moments!, kineticTilde: facts.sums.kinetic!, a: facts.a };
      tracker = new SidecarTracker(ctx.particleMass, facts.mass0 / ctx.particleMass, squeezingDb, ctx.startTime, ctx.grid.cellVolume, start);
      if (saved) tracker.restore(saved);
    },
    afterStep(facts: StepFacts) {
      running().afterStep({ ...facts, sums: facts.sums.moments!, midKineticTilde: facts.sums.kinetic! });
    },
    output(facts) {
      if (facts.kind === "row") return sidecarRow(running(), facts.a, context!.scales.units.timeS);
    },
    stop() {
      const ctx = context!;
      const timeS = ctx.scales.units.timeS;
      const record = clocksRecord(running(), ctx.background, timeS, (ctx.endTime - ctx.startTime) * timeS);
      writeFileAtomic(runPaths(ctx.outputDir).clocks, JSON.stringify(record, null, 2) + "\n");
      return { clocks: record.clocks };
    },
    save: () => running().save(),
    restore(state) {
      saved = state as Parameters<SidecarTracker["restore"]>[0];
    },
  };
}
