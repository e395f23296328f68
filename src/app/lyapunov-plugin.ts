/**
 * The largest Lyapunov exponent of the run's own split-step map, measured
 * with one tangent-linear field advanced beside ψ (`[breakdown] tangent`),
 * by Benettin renormalisation (Benettin, Galgani, Giorgilli & Strelcyn 1980,
 * Meccanica 15, 9):
 *
 * - start: dψ₀ = (η₁ + iη₂)ψ with real noise band-limited to 0 < |k| ≤ k_J,
 *   the Jeans wavenumber of the mass-weighted density ρ_eff = ∫ρ²/∫ρ at the
 *   start (initial-conditions/tangent-seed.ts), from `seed`;
 * - every interval τ of physical time (default one dynamical time
 *   1/√(4πG ρ_eff) at the start, ρ_eff physical): remove the neutral
 *   directions, the global phase iψ and the norm ψ, by
 *   dψ ← dψ − ψ⟨ψ|dψ⟩/⟨ψ|ψ⟩, take d = ‖dψ‖, add ln(d/d₀) to the sum and
 *   rescale dψ to d₀ (‖dψ‖² = ∫|ψ|² dV, the reference's mass);
 * - with a region (`breakdown.region`, parsed as the regions of `psibox
 *   clocks`): the growth is that of the norm in the region's window w,
 *   ‖w dψ‖, from just after one renormalisation to the next (the rescaling
 *   still uses the whole norm, so no part of dψ outgrows the doubles);
 * - the finite-time rate λ_T = Σ ln(dᵢ/d₀)/(t − t₀), the rate of the last
 *   interval, and ∫λ dt = Σ ln(dᵢ/d₀);
 * - at the end, the scrambling clock ∫λ dt = ln N (app/scrambling-clock.ts),
 *   N = M/m the particles of the run.
 *
 * The renormalisation applies the closing kick owed by ψ and the tangent
 * (exactly, in separate passes), so ψ's trajectory differs from a run
 * without the companion by round-off only; the interval times are fixed
 * multiples of τ after the start, so a resumed or extended run renormalises
 * at the same times and repeats the uninterrupted run bit for bit (at the
 * same thread count: the overlaps are sums).
 */
import type { RunContext, RunPlugin, StartFacts, StepFacts, PluginFields } from "../simulation/plugin.js";
import { jeansWavenumber, tangentSeed } from "../initial-conditions/tangent-seed.js";
import { PC_M } from "../physics/constants.js";
import { clockRecord, rateClock, scramblingClock } from "./scrambling-clock.js";
import type { Region } from "../config/region.js";
import type { Grid } from "../grid/grid.js";
import { regionWeights } from "../quantum/mode.js";
import { renormaliseTwin, twinStart, twinStartNorm, type TwinState } from "./twin-run.js";

const KPC_M = 1e3 * PC_M;

/** The [breakdown] options the plug-in takes (code units). */
export interface LyapunovOptions {
  /** Renormalisation interval (code time); undefined: one dynamical time at the start. */
  readonly interval: number | undefined;
  readonly seed: number;
  /** Where the perturbation's growth is measured (default: the whole box). */
  readonly region?: Region;
  /** The twin nonlinear run's relative offset e (0 or absent: no twin). */
  readonly twinOffset?: number;
}

/** What the plug-in keeps (and checkpoints). */
interface LyapunovState {
  t0: number;
  tau: number;
  /** Time of the last renormalisation, and of the next. */
  tLast: number;
  next: number;
  /** ‖dψ‖² right after the last renormalisation. */
  d0sq: number;
  lnSum: number;
  lastRate: number;
  intervals: number;
  kJeans: number;
  /** ln N of the run (N = M₀/m). */
  lnN: number;
  /** Times and ∫λ dt at the start and at every renormalisation. */
  times: number[];
  integrals: number[];
  /** With a region: ‖w dψ‖² right after the last renormalisation, and the centre of a "densest" region. */
  w0sq?: number;
  center?: number[];
  /** The twin nonlinear run, when there is one. */
  twin?: TwinState;
}

/** ‖w f‖² = Σ w²|f|² ΔV, the perturbation's norm in the region's window. */
function windowedNorm(w: Float64Array, f: Float64Array, cellVolume: number): number {
  let sum = 0;
  for (let p = 0; p < w.length; p++) sum += w[p]! * w[p]! * (f[2 * p]! * f[2 * p]! + f[2 * p + 1]! * f[2 * p + 1]!);
  return sum * cellVolume;
}

/** The region's window (a "densest" region around `center`, or ψ's densest cell now). */
function windowOf(grid: Grid, region: Exclude<Region, { kind: "box" }>, psi: Float64Array, center?: number[]): { w: Float64Array; center?: number[] } {
  if (region.kind === "densest" && center) return { w: regionWeights(grid, { kind: "sphere", center, radius: region.radius }, psi).w, center };
  return regionWeights(grid, region, psi);
}

/** Project dψ off ψ and iψ, and rescale it to ‖dψ‖² = mass; returns ‖dψ⊥‖² before the rescale. */
function renormalise(fields: PluginFields): { perp2: number; mass: number } {
  const o = fields.overlap(1);
  const mass = fields.mass();
  const perp2 = o.norm2 - (o.re * o.re + o.im * o.im) / mass;
  if (!(perp2 > 0) || !Number.isFinite(perp2)) throw new Error(`the tangent field's norm is ${perp2} after projection; it cannot be renormalised`);
  fields.combine(1, Math.sqrt(mass / perp2), o.re / mass, o.im / mass);
  return { perp2, mass };
}

/** The region in summary.json: its kind and, in kpc, its centre (a "densest" one's as found at the start) and radius. */
function regionRecord(region: Region, center: number[] | undefined, kpc: number) {
  if (region.kind === "box") return { kind: "box" };
  const c = region.kind === "densest" ? center : region.center;
  const radius = region.kind === "cube" ? region.halfWidth : region.radius;
  return { kind: region.kind, ...(c ? { center_kpc: c.map((v) => v * kpc) } : {}), radius_kpc: radius * kpc };
}

/** The plug-in's part of summary.json: the rates, the integral and the clocks of the rate, in physical units. */
function summaryOf(st: LyapunovState, u: { timeS: number; kpc: number; span: number; seed: number }) {
  const finite = st.intervals > 0 ? st.lnSum / (st.tLast - st.t0) : Number.NaN;
  return {
    scrambling_clock: { ...clockRecord(scramblingClock(st.times, st.integrals, st.lnN), u.timeS, u.span), ln_N: st.lnN },
    depletion_time_from_rate: { ...clockRecord(rateClock(st.times, st.integrals, st.lnN / 2, "∫λ dt = ½ ln N"), u.timeS, u.span), half_ln_N: st.lnN / 2 },
    rate_per_s: finite / u.timeS,
    last_interval_rate_per_s: st.lastRate / u.timeS,
    integral: st.lnSum,
    intervals: st.intervals,
    interval_s: st.tau * u.timeS,
    seed: u.seed,
    seed_k_max_per_kpc: st.kJeans / u.kpc,
    ...(st.twin ? { twin: twinRecord(st.twin, finite, st, u.timeS) } : {}),
  };
}

/** The twin run's rates beside the tangent's (summary.json lyapunov.twin). */
function twinRecord(twin: TwinState, tangentRate: number, st: LyapunovState, timeS: number) {
  const rate = st.intervals > 0 ? twin.lnSum / (st.tLast - st.t0) : Number.NaN;
  return {
    offset: twin.offset,
    rate_per_s: rate / timeS,
    last_interval_rate_per_s: twin.lastRate / timeS,
    integral: twin.lnSum,
    ratio_to_tangent: rate / tangentRate,
    method: "a nonlinear twin from ψ + e·u, renormalised with the tangent (Benettin)",
  };
}

/** The twin's start ψ + e·u from the tangent's start u (field 1) into field 2. */
function startTwin(fields: PluginFields, offset: number, cellVolume: number, window: Float64Array | undefined): TwinState {
  const psi = Float64Array.from(fields.reference());
  const twin = twinStart(psi, fields.field(1), offset);
  fields.set(2, twin);
  return { offset, w0sq: twinStartNorm(psi, twin, cellVolume, window), lnSum: 0, lastRate: Number.NaN };
}

/** A fresh start: the seed loaded into the tangent field and renormalised, τ and k_J from the start's moments. */
function seeded(context: RunContext, facts: StartFacts, fields: PluginFields, options: LyapunovOptions): LyapunovState {
  const m = facts.sums.moments!;
  const rhoEff = m.rho2 / m.rho;
  const tau = options.interval ?? 1 / Math.sqrt(rhoEff / facts.a ** 3);
  const kJeans = jeansWavenumber(rhoEff, facts.a);
  fields.set(1, tangentSeed(context.grid, fields.reference(), kJeans, options.seed));
  const { mass } = renormalise(fields);
  const lnN = Math.log(facts.mass0 / context.particleMass);
  return { t0: facts.t, tau, tLast: facts.t, next: facts.t + tau, d0sq: mass, lnSum: 0, lastRate: Number.NaN, intervals: 0, kJeans, lnN, times: [facts.t], integrals: [0] };
}

/** The state as JSON: JSON has no NaN, so the rate of no interval yet is saved as null. */
function saveState(st: LyapunovState) {
  const orNull = (v: number) => (Number.isFinite(v) ? v : null);
  return { ...st, lastRate: orNull(st.lastRate), ...(st.twin ? { twin: { ...st.twin, lastRate: orNull(st.twin.lastRate) } } : {}) };
}

/** What saveState wrote. */
function restoreState(state: unknown): LyapunovState {
  type Saved = Omit<LyapunovState, "lastRate" | "twin"> & { lastRate: number | null; twin?: Omit<TwinState, "lastRate"> & { lastRate: number | null } };
  const { twin, ...rest } = state as Saved;
  return { ...rest, lastRate: rest.lastRate ?? Number.NaN, ...(twin ? { twin: { ...twin, lastRate: twin.lastRate ?? Number.NaN } } : {}) };
}

/** The plug-in. */
export function lyapunovPlugin(options: LyapunovOptions): RunPlugin {
  let fields: PluginFields | undefined;
  let timeS = 1;
  let kpc = 1;
  let spanEnd = 1;
  let s: LyapunovState | undefined;
  let window: Float64Array | undefined;
  let cellVolume = 1;
  const region = options.region ?? { kind: "box" };
  const twinOffset = options.twinOffset ?? 0;
  /** Growth of the interval (ln of the norm's ratio, in the window with a region) and the new reference norm. */
  const measureGrowth = (st: LyapunovState, perp2: number, mass: number): number => {
    if (!window) return 0.5 * Math.log(perp2 / st.d0sq);
    const after = windowedNorm(window, fields!.field(1), cellVolume); // ‖w dψ⊥‖² = after · perp2/mass
    const growth = 0.5 * Math.log((after * perp2) / mass / st.w0sq!);
    st.w0sq = after;
    return growth;
  };
  const finiteTime = (st: LyapunovState) => (st.intervals > 0 ? st.lnSum / (st.tLast - st.t0) : Number.NaN);
  return {
    name: "lyapunov",
    stateVersion: 2,
    fields: twinOffset > 0 ? [{ kind: "tangent" }, { kind: "own-gravity", startScale: 1 }] : [{ kind: "tangent" }],
    measures: ["moments"],
    columns: ["lyapunov_rate_per_s", "lyapunov_interval_rate_per_s", "lyapunov_integral", ...(twinOffset > 0 ? ["lyapunov_twin_integral"] : [])],
    attach(f) {
      fields = f;
    },
    start(context: RunContext, facts: StartFacts) {
      timeS = context.scales.units.timeS;
      kpc = context.scales.units.lengthM / KPC_M;
      spanEnd = context.endTime;
      cellVolume = context.grid.cellVolume;
      if (!facts.resumed) s = seeded(context, facts, fields!, options);
      if (region.kind !== "box") {
        const made = windowOf(context.grid, region, fields!.reference(), s!.center);
        window = made.w;
        if (!facts.resumed) {
          if (made.center) s!.center = made.center;
          s!.w0sq = windowedNorm(window, fields!.field(1), cellVolume);
        }
      }
      if (!facts.resumed && twinOffset > 0) s!.twin = startTwin(fields!, twinOffset, cellVolume, window);
    },
    afterStep(facts: StepFacts) {
      const st = s!;
      if (facts.t < st.next - 1e-9 * st.tau) return;
      const { perp2, mass } = renormalise(fields!);
      const growth = measureGrowth(st, perp2, mass);
      if (st.twin) {
        const twin = renormaliseTwin(Float64Array.from(fields!.reference()), fields!.field(2), st.twin, cellVolume, window);
        fields!.set(2, twin.reset);
        st.twin.lnSum += twin.growth;
        st.twin.lastRate = twin.growth / (facts.t - st.tLast);
      }
      st.lnSum += growth;
      st.lastRate = growth / (facts.t - st.tLast);
      st.tLast = facts.t;
      st.d0sq = mass;
      st.intervals++;
      st.times.push(facts.t);
      st.integrals.push(st.lnSum);
      st.next = st.t0 + (Math.floor((facts.t - st.t0) / st.tau + 1e-9) + 1) * st.tau;
    },
    output(facts) {
      if (facts.kind !== "row") return;
      const st = s!;
      return [finiteTime(st) / timeS, st.lastRate / timeS, st.lnSum, ...(st.twin ? [st.twin.lnSum] : [])];
    },
    stop: () => ({ lyapunov: { ...summaryOf(s!, { timeS, kpc, span: spanEnd - s!.t0, seed: options.seed }), region: regionRecord(region, s!.center, kpc) } }),
    save: () => saveState(s!),
    restore(state) {
      s = restoreState(state);
    },
  };
}
