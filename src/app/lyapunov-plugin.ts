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
import type { RunContext, RunPlugin, StartFacts, StepFacts, TangentFields } from "../simulation/plugin.js";
import { jeansWavenumber, tangentSeed } from "../initial-conditions/tangent-seed.js";
import { PC_M } from "../physics/constants.js";
import { clockRecord, rateClock, scramblingClock } from "./scrambling-clock.js";

const KPC_M = 1e3 * PC_M;

/** The [breakdown] options the plug-in takes (code units). */
export interface LyapunovOptions {
  /** Renormalisation interval (code time); undefined: one dynamical time at the start. */
  readonly interval: number | undefined;
  readonly seed: number;
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
}

/** Project dψ off ψ and iψ, and rescale it to ‖dψ‖² = mass; returns ‖dψ⊥‖² before the rescale. */
function renormalise(fields: TangentFields): { perp2: number; mass: number } {
  const o = fields.overlap(1);
  const mass = fields.mass();
  const perp2 = o.norm2 - (o.re * o.re + o.im * o.im) / mass;
  if (!(perp2 > 0) || !Number.isFinite(perp2)) throw new Error(`the tangent field's norm is ${perp2} after projection; it cannot be renormalised`);
  fields.combine(1, Math.sqrt(mass / perp2), o.re / mass, o.im / mass);
  return { perp2, mass };
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
  };
}

/** The plug-in. */
export function lyapunovPlugin(options: LyapunovOptions): RunPlugin {
  let fields: TangentFields | undefined;
  let timeS = 1;
  let kpc = 1;
  let spanEnd = 1;
  let s: LyapunovState | undefined;
  const finiteTime = (st: LyapunovState) => (st.intervals > 0 ? st.lnSum / (st.tLast - st.t0) : Number.NaN);
  return {
    name: "lyapunov",
    stateVersion: 2,
    tangents: 1,
    measures: ["moments"],
    columns: ["lyapunov_rate_per_s", "lyapunov_interval_rate_per_s", "lyapunov_integral"],
    attach(f) {
      fields = f;
    },
    start(context: RunContext, facts: StartFacts) {
      timeS = context.scales.units.timeS;
      kpc = context.scales.units.lengthM / KPC_M;
      spanEnd = context.endTime;
      if (facts.resumed) return;
      const m = facts.sums.moments!;
      const rhoEff = m.rho2 / m.rho;
      const tau = options.interval ?? 1 / Math.sqrt(rhoEff / facts.a ** 3);
      const kJeans = jeansWavenumber(rhoEff, facts.a);
      fields!.set(1, tangentSeed(context.grid, fields!.reference(), kJeans, options.seed));
      const { mass } = renormalise(fields!);
      const lnN = Math.log(facts.mass0 / context.particleMass);
      s = { t0: facts.t, tau, tLast: facts.t, next: facts.t + tau, d0sq: mass, lnSum: 0, lastRate: Number.NaN, intervals: 0, kJeans, lnN, times: [facts.t], integrals: [0] };
    },
    afterStep(facts: StepFacts) {
      const st = s!;
      if (facts.t < st.next - 1e-9 * st.tau) return;
      const { perp2, mass } = renormalise(fields!);
      const growth = 0.5 * Math.log(perp2 / st.d0sq);
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
      return [finiteTime(st) / timeS, st.lastRate / timeS, st.lnSum];
    },
    stop: () => ({ lyapunov: summaryOf(s!, { timeS, kpc, span: spanEnd - s!.t0, seed: options.seed }) }),
    // JSON has no NaN: the rate of no interval yet is saved as null
    save: () => ({ ...s!, lastRate: Number.isFinite(s!.lastRate) ? s!.lastRate : null }),
    restore(state) {
      const saved = state as Omit<LyapunovState, "lastRate"> & { lastRate: number | null };
      s = { ...saved, lastRate: saved.lastRate ?? Number.NaN };
    },
  };
}
