/**
 * The condensate's depletion measured with tangent-linear fields
 * (`breakdown.probes = p`, 2p fields). Write the linear response of the
 * field as dψ(t) = U dψ₀ + V conj(dψ₀); the number of particles out of the
 * condensate (time-dependent Bogoliubov theory, Castin & Dum 1998, PRA 57,
 * 3008) is N_dep = Tr(V†V), a count. With complex white noise z,
 * ⟨z(x) z̄(y)⟩ = δ(x − y) (variance 1/ΔV per cell), projected orthogonal to
 * ψ, the fields T(z) and T(iz) give V z̄ = [T(z) + i T(iz)]/2, and the average
 * of ‖Q V z̄‖² over the probes is Tr(V†V) (Hutchinson 1990, Commun. Stat.
 * Simul. 19, 433), Q = 1 − |ψ⟩⟨ψ|/⟨ψ|ψ⟩ removing the condensate itself. Its
 * statistical error is the probes' standard error s/√p. The sums run in
 * JavaScript in a fixed order, so they do not depend on the thread count.
 */
import type { RunContext, RunPlugin, StartFacts, PluginFields } from "../simulation/plugin.js";
import { SeededRandom } from "../math/random.js";
import { clockRecord } from "./scrambling-clock.js";
import { depletionClock } from "./depletion-clock.js";

/** The [breakdown] options of the depletion (probes ≥ 1, seed). */
export interface DepletionOptions {
  readonly probes: number;
  readonly seed: number;
  /** The depletion clock rings at N_dep = fraction × N (0 < fraction ≤ 1). */
  readonly fraction: number;
}

/** Σ ψ̄ f over cells (re, im), without the cell volume. */
function dot(psi: Float64Array, f: Float64Array): [number, number] {
  let re = 0;
  let im = 0;
  for (let i = 0; i < psi.length; i += 2) {
    re += psi[i]! * f[i]! + psi[i + 1]! * f[i + 1]!;
    im += psi[i]! * f[i + 1]! - psi[i + 1]! * f[i]!;
  }
  return [re, im];
}

/** A probe: complex white noise of variance 1/ΔV per cell, projected orthogonal to ψ. */
export function whiteProbe(psi: Float64Array, cellVolume: number, rng: SeededRandom): Float64Array {
  const z = new Float64Array(psi.length);
  const sd = Math.sqrt(0.5 / cellVolume);
  for (let i = 0; i < z.length; i++) z[i] = sd * rng.normal();
  const [or, oi] = dot(psi, z);
  const [nr] = dot(psi, psi);
  const [cr, ci] = [or / nr, oi / nr];
  for (let i = 0; i < z.length; i += 2) {
    z[i] = z[i]! - (cr * psi[i]! - ci * psi[i + 1]!);
    z[i + 1] = z[i + 1]! - (cr * psi[i + 1]! + ci * psi[i]!);
  }
  return z;
}

/** ‖Q (a + ib)/2‖² ΔV-weighted, with Q the projection off ψ. */
export function depletedNorm(psi: Float64Array, a: Float64Array, b: Float64Array, cellVolume: number): number {
  let norm = 0;
  let pr = 0;
  let pi = 0;
  let mass = 0;
  for (let i = 0; i < psi.length; i += 2) {
    // f = (a + ib)/2
    const fr = 0.5 * (a[i]! - b[i + 1]!);
    const fi = 0.5 * (a[i + 1]! + b[i]!);
    norm += fr * fr + fi * fi;
    pr += psi[i]! * fr + psi[i + 1]! * fi;
    pi += psi[i]! * fi - psi[i + 1]! * fr;
    mass += psi[i]! * psi[i]! + psi[i + 1]! * psi[i + 1]!;
  }
  return cellVolume * (norm - (pr * pr + pi * pi) / mass);
}

/** What the plug-in keeps (and checkpoints): the measured depletion at the rows, and the run's N. */
interface DepletionState {
  particles: number;
  times: number[];
  depleted: number[];
}

/** The plug-in's part of summary.json, with the depletion clock in physical units. */
function summaryOf(st: DepletionState, last: { n: number; error: number }, options: DepletionOptions, timeS: number, span: number) {
  const target = options.fraction * st.particles;
  return {
    depleted_N: last.n,
    depleted_N_error: last.error,
    depleted_fraction: last.n / st.particles,
    particles_N: st.particles,
    probes: options.probes,
    seed: options.seed,
    depletion_clock: { ...clockRecord(depletionClock(st.times, st.depleted, target), timeS, span), fraction: options.fraction, target_N: target },
  };
}

/** The plug-in. */
export function depletionPlugin(options: DepletionOptions): RunPlugin {
  let fields: PluginFields | undefined;
  let cellVolume = 1;
  let timeS = 1;
  let span = 1;
  let last = { n: 0, error: 0 };
  let s: DepletionState | undefined;
  const measure = (t: number) => {
    const psi = Float64Array.from(fields!.reference());
    const samples = Array.from({ length: options.probes }, (_, j) => {
      const a = Float64Array.from(fields!.field(2 * j + 1));
      return depletedNorm(psi, a, fields!.field(2 * j + 2), cellVolume);
    });
    const n = samples.reduce((sum, x) => sum + x, 0) / samples.length;
    const variance = samples.length > 1 ? samples.reduce((sum, x) => sum + (x - n) ** 2, 0) / (samples.length - 1) : Number.NaN;
    last = { n, error: Math.sqrt(variance / samples.length) };
    if (s!.times.length === 0 || t > s!.times.at(-1)!) {
      s!.times.push(t);
      s!.depleted.push(n);
    }
  };
  return {
    name: "depletion",
    stateVersion: 1,
    fields: Array.from({ length: 2 * options.probes }, () => ({ kind: "tangent" }) as const),
    columns: ["depleted_N", "depleted_N_error"],
    attach(f) {
      fields = f;
    },
    start(context: RunContext, facts: StartFacts) {
      cellVolume = context.grid.cellVolume;
      timeS = context.scales.units.timeS;
      span = context.endTime - context.startTime;
      if (facts.resumed) return;
      s = { particles: facts.mass0 / context.particleMass, times: [], depleted: [] };
      const rng = new SeededRandom(options.seed);
      const psi = fields!.reference();
      for (let j = 0; j < options.probes; j++) {
        const z = whiteProbe(psi, cellVolume, rng);
        const iz = new Float64Array(z.length);
        for (let i = 0; i < z.length; i += 2) [iz[i], iz[i + 1]] = [-z[i + 1]!, z[i]!];
        fields!.set(2 * j + 1, z);
        fields!.set(2 * j + 2, iz);
      }
      measure(facts.t);
    },
    output(facts) {
      if (facts.kind !== "row") return;
      measure(facts.t);
      return [last.n, last.error];
    },
    stop(facts) {
      measure(facts.t);
      return { depletion: summaryOf(s!, last, options, timeS, span) };
    },
    save: () => s!,
    restore(state) {
      s = state as DepletionState;
    },
  };
}
