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
import { gravityRate } from "./gravity-rate.js";
import { ConfigError } from "../core/errors.js";
import { COHERENT, validateStart, type GaussianStart } from "./gaussian-start.js";
import type { ModeModel } from "./clocks.js";
import type { ModeRegion } from "./mode.js";
import { OutflowMeter, type OutflowMeterState } from "./outflow.js";
import { CONTACT_COLUMNS, OUTFLOW_COLUMNS, SIDECAR_COLUMNS, clocksRecord, contactRow, outflowRecord, sidecarRow } from "./sidecar-report.js";

/** The settings the plug-in takes (the resolved [sidecar] section; rates per code time). */
export interface SidecarSettings {
  readonly squeezingDb: number;
  readonly start?: GaussianStart;
  readonly lossRate?: number;
  readonly dephasingRate?: number;
  /** The twin field's relative extra amplitude e (ψ₂(0) = (1 + e/2)ψ(0)); 0 or absent: no twin. */
  readonly twinExcess?: number;
  /** A region whose mass outflow is measured at every time-series row, as a loss rate (code lengths). */
  readonly outflow?: Exclude<ModeRegion, { kind: "box" }>;
  /** The run's contact coefficient g (code units; 0 or absent: none): χ gains χ_SI, reported apart. */
  readonly contact?: number;
}

const START_KEYS: Record<string, string> = { squeeze: "sidecar.squeeze", "squeeze-angle": "sidecar.squeeze_angle", thermal: "sidecar.thermal_quanta" };

/** The mode model of the settings, checked against the run's N (a ConfigError naming the key otherwise). */
function modelOf(settings: SidecarSettings, N: number): ModeModel {
  const start = settings.start ?? COHERENT;
  try {
    validateStart(N, start);
  } catch (e) {
    if (!(e instanceof RangeError)) throw e;
    const [name, ...rest] = e.message.split(": ");
    throw new ConfigError(START_KEYS[name as string] ?? "sidecar", rest.join(": "));
  }
  return { start, lossRate: settings.lossRate ?? 0, dephasingRate: settings.dephasingRate ?? 0 };
}

/** The sidecar plug-in, with the squeezing level to time (sidecar.squeezing_db), the start and the rates. */
export function sidecarPlugin(settings: SidecarSettings): RunPlugin {
  const { squeezingDb } = settings;
  let context: RunContext | undefined;
  let tracker: SidecarTracker | undefined;
  let saved: Parameters<SidecarTracker["restore"]>[0] | undefined;
  const running = (): SidecarTracker => {
    if (!tracker) throw new Error("the sidecar plug-in was called before start()");
    return tracker;
  };
  const twinExcess = settings.twinExcess ?? 0;
  const twin = twinExcess > 0;
  let meter: OutflowMeter | undefined;
  let savedMeter: OutflowMeterState | undefined;
  const contact = settings.contact ?? 0;
  return {
    name: "sidecar",
    stateVersion: 1,
    measures: ["kinetic", "moments", ...(twin ? (["overlaps"] as const) : []), ...(settings.outflow ? (["field"] as const) : [])],
    ...(twin ? { fields: [{ kind: "own-gravity", startScale: 1 + twinExcess / 2 }] } : {}),
    columns: [...SIDECAR_COLUMNS, ...(contact !== 0 ? CONTACT_COLUMNS : []), ...(settings.outflow ? OUTFLOW_COLUMNS : [])],
    start(ctx: RunContext, facts: StartFacts) {
      context = ctx;
      if (settings.outflow) meter = new OutflowMeter(ctx.grid, settings.outflow, ctx.particleMass);
      if (meter && savedMeter) meter.restore(savedMeter);
      const start = { sums: facts.sums.moments!, kineticTilde: facts.sums.kinetic!, a: facts.a };
      const N = facts.mass0 / ctx.particleMass;
      const twinStart = twin ? { excess: twinExcess, overlap: facts.sums.overlaps![0]! } : undefined;
      tracker = new SidecarTracker(ctx.particleMass, N, squeezingDb, ctx.startTime, ctx.grid.cellVolume, start, modelOf(settings, N), twinStart, gravityRate(ctx.gravity, ctx.background), contact);
      if (saved) tracker.restore(saved);
    },
    afterStep(facts: StepFacts) {
      const overlap = facts.sums.overlaps?.[0];
      running().afterStep({ ...facts, sums: facts.sums.moments!, midKineticTilde: facts.sums.kinetic!, ...(overlap ? { overlap } : {}) });
    },
    output(facts) {
      if (facts.kind !== "row") return;
      const timeS = context!.scales.units.timeS;
      const row = [...sidecarRow(running(), facts.a, timeS), ...(contact !== 0 ? contactRow(running(), timeS) : [])];
      if (!meter) return row;
      const [n, rate] = meter.sample(facts.t, facts.psi!);
      return [...row, n, rate / timeS];
    },
    stop() {
      const ctx = context!;
      const timeS = ctx.scales.units.timeS;
      const outflow = meter ? outflowRecord(meter, timeS) : undefined;
      const record = { ...clocksRecord(running(), ctx.background, timeS, (ctx.endTime - ctx.startTime) * timeS), ...(outflow ? { outflow } : {}) };
      writeFileAtomic(runPaths(ctx.outputDir).clocks, JSON.stringify(record, null, 2) + "\n");
      return { clocks: record.clocks, ...(record.adiabatic_twin ? { adiabatic_twin: record.adiabatic_twin } : {}), ...(outflow ? { outflow } : {}) };
    },
    save: () => {
      const outflow = meter?.save();
      return { ...running().save(), ...(outflow ? { outflow } : {}) };
    },
    checkState: (state) => (isSidecarState(state) ? undefined : "is not a sidecar state psibox wrote (rates and clocks with finite values)"),
    restore(state) {
      saved = state as Parameters<SidecarTracker["restore"]>[0];
      savedMeter = (state as { outflow?: OutflowMeterState }).outflow;
    },
  };
}

const CLOCK_NAMES = new Set(["squeezing-onset", "squeezing-level", "phase-diffusion", "classical-breakdown"]);

function finiteFields(v: unknown, keys: readonly string[]): boolean {
  return typeof v === "object" && v !== null && keys.every((k) => Number.isFinite((v as Record<string, unknown>)[k]));
}

/** Is `saved` a state as the tracker saves it (rates and the clocks' running state, all finite)? */
export function isSidecarState(saved: unknown): boolean {
  try {
    const s = saved as { rates?: unknown; clocks?: unknown; outflow?: unknown };
    const rateKeys = ["omegaTilde", "chiTilde", "lambda"];
    if (!finiteFields(s?.rates, rateKeys) || typeof s.clocks !== "string") return false;
    if (s.outflow !== undefined && !finiteFields(s.outflow, ["t0", "n0", "t", "n"])) return false;
    const c = JSON.parse(s.clocks) as { rates?: unknown; rung?: unknown };
    if (!finiteFields(c, ["t", "theta", "chi", "b"]) || !finiteFields(c.rates, rateKeys) || !Array.isArray(c.rung)) return false;
    return c.rung.every((r) => Array.isArray(r) && r.length === 2 && CLOCK_NAMES.has(r[0] as string) && Number.isFinite(r[1]));
  } catch {
    return false;
  }
}
