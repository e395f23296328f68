/**
 * The run loop: advance a stepper from its current time to an end time with
 * the time-step rules, shortening the last step to land exactly on the end,
 * and stop with a clear reason when a guard rail trips. Before every step
 * the field is copied aside; a step that produces a non-finite field or a
 * mass drift above tolerance is undone, so the stepper always holds the last
 * good state.
 */
import type { SplitStepper } from "../integrators/split-step.js";
import { chooseTimestep, type StepLimiter, type TimestepRules } from "../integrators/timestep.js";

/** What bounds a run. */
export interface EvolveLimits {
  /** End time [code time]. */
  readonly endTime: number;
  /** Times [code time] the run must land on exactly (output times), in any order. */
  readonly stops?: readonly number[];
  /** Largest allowed |M − M₀| / M₀. @default 1e-8 */
  readonly massTolerance: number;
  /** Step cap. */
  readonly maxSteps: number;
}

/** Facts about the step just taken, given to callbacks. */
export interface StepInfo {
  /** Steps taken so far (1 after the first). */
  readonly step: number;
  readonly dt: number;
  readonly limiter: StepLimiter;
  /** Relative mass drift since the start. */
  readonly massDrift: number;
  /** The step ended exactly on one of `limits.stops` or the end time. */
  readonly landed: boolean;
}

/** Where a resumed run left off. */
export interface EvolveStart {
  /** Steps already taken. */
  readonly steps: number;
  /** Mass at the very start of the run (the reference of the drift check). */
  readonly mass0: number;
}

/** How a run ended. */
export interface EvolveResult {
  readonly status: "completed" | "stopped";
  /** Why the run stopped (absent when completed). */
  readonly reason?: string;
  readonly steps: number;
}

/** Callbacks of the run loop. */
export interface EvolveHooks {
  /**
   * Before a step whose length the end time shortened (the last step, or the
   * first of two halves before it): the state then is still on the path of
   * any run of the same config with a later end.
   */
  readonly beforeEndStep?: (stepper: SplitStepper, stepsTaken: number) => void;
  /** After each accepted step. */
  readonly onStep?: (stepper: SplitStepper, info: StepInfo) => void;
  /** Checked before each step; return a reason to stop early (e.g. an interrupt). */
  readonly stopRequested?: () => string | undefined;
  /** Checked at the start and after each step, before onStep: a reason the field cannot be trusted stops the run (the step is undone). */
  readonly guard?: (stepper: SplitStepper) => string | undefined;
  /** Formats a code time for messages (default: the bare number). */
  readonly formatTime?: (t: number) => string;
}

/** Advance `stepper` to `limits.endTime`. */
export function evolve(
  stepper: SplitStepper,
  rules: TimestepRules,
  limits: EvolveLimits,
  hooks: EvolveHooks = {},
  start?: EvolveStart,
): EvolveResult {
  const steps = evolveSteps(stepper, rules, limits, hooks, start);
  for (let r = steps.next(); ; r = steps.next()) if (r.done) return r.value;
}

/**
 * The same as evolve(), but returning to the event loop every `yieldMs`
 * milliseconds so that signals (Ctrl-C) and timers are handled during a run.
 */
export async function evolveAsync(
  stepper: SplitStepper,
  rules: TimestepRules,
  limits: EvolveLimits,
  hooks: EvolveHooks = {},
  start?: EvolveStart,
  yieldMs = 100,
): Promise<EvolveResult> {
  const steps = evolveSteps(stepper, rules, limits, hooks, start);
  let last = performance.now();
  for (let r = steps.next(); ; r = steps.next()) {
    if (r.done) return r.value;
    if (performance.now() - last > yieldMs) {
      await new Promise((resolve) => setImmediate(resolve));
      last = performance.now();
    }
  }
}

/** The run loop as a generator: it yields after every accepted step and returns how the run ended. */
function* evolveSteps(
  stepper: SplitStepper,
  rules: TimestepRules,
  limits: EvolveLimits,
  hooks: EvolveHooks,
  start?: EvolveStart,
): Generator<void, EvolveResult, void> {
  const fmt = hooks.formatTime ?? ((t: number) => t.toPrecision(6));
  const mass0 = start?.mass0 ?? stepper.mass;
  const tEnd = limits.endTime;
  let steps = start?.steps ?? 0;
  // round-off of the times themselves: relative to their size, so that a span far below one code time unit still runs
  const tolerance = 1e-12 * Math.max(Math.abs(tEnd), Math.abs(stepper.time));
  const stops = [...(limits.stops ?? []), tEnd].filter((t) => t <= tEnd).sort((a, b) => a - b);
  const atStart = hooks.guard?.(stepper);
  if (atStart) return { status: "stopped", reason: `at the start (step ${steps}, t = ${fmt(stepper.time)}): ${atStart}`, steps };
  while (stepper.time < tEnd - tolerance) {
    const target = stops.find((t) => t > stepper.time + tolerance) ?? tEnd;
    const requested = hooks.stopRequested?.();
    if (requested) return { status: "stopped", reason: requested, steps };
    if (steps >= limits.maxSteps) {
      return { status: "stopped", reason: `reached the step limit (${limits.maxSteps}) before the end time`, steps };
    }
    let { dt, limiter } = chooseTimestep(stepper, rules);
    if (!(dt > 0) || !Number.isFinite(dt)) {
      return {
        status: "stopped",
        reason: `step ${steps + 1} at t = ${fmt(stepper.time)}: the time-step rules gave no usable step (${limiter} limit); the potential is probably non-finite`,
        steps,
      };
    }
    let landed = false;
    let shortened = false;
    if (stepper.time + dt >= target - tolerance) {
      dt = target - stepper.time;
      landed = true;
      shortened = true;
      if (target === tEnd) limiter = "end";
    } else if (stepper.time + 1.5 * dt > target) {
      // split the remainder evenly rather than leave a sliver of a step
      dt = 0.5 * (target - stepper.time);
      shortened = true;
    }
    if (shortened && target === tEnd) hooks.beforeEndStep?.(stepper, steps);
    // a copy of the state as stored (ψ may owe its closing kick) in the stepper's undo buffer
    stepper.saveUndo();
    const t0 = stepper.time;
    stepper.step(dt);
    if (landed) stepper.time = target; // exact, so output times are not off by round-off
    steps++;
    const drift = Math.abs(stepper.mass - mass0) / mass0;
    if (!Number.isFinite(stepper.mass) || !(drift <= limits.massTolerance)) {
      const what = Number.isFinite(stepper.mass)
        ? `the mass changed by ${drift.toExponential(2)} (tolerance ${limits.massTolerance.toExponential(1)})`
        : "the field became non-finite";
      stepper.undo();
      return {
        status: "stopped",
        reason:
          `step ${steps} at t = ${fmt(t0)} (Δt = ${fmt(dt)}, ${limiter} limit): ${what}; ` +
          "likely cause: a time step too large (lower integrator.safety or integrator.fixed_step) " +
          "or a grid too coarse for the structures that formed (more grid.cells); the last good state is kept",
        steps: steps - 1,
      };
    }
    const broken = hooks.guard?.(stepper);
    if (broken) {
      stepper.undo();
      return { status: "stopped", reason: `step ${steps} at t = ${fmt(t0)} (Δt = ${fmt(dt)}, ${limiter} limit): ${broken}; the last good state is kept`, steps: steps - 1 };
    }
    hooks.onStep?.(stepper, { step: steps, dt, limiter, massDrift: drift, landed });
    yield;
  }
  return { status: "completed", steps };
}
