/**
 * Background expansion: a flat ΛCDM universe with optional radiation,
 *   H(a)² = H0² (Ω_r a⁻⁴ + Ω_m a⁻³ + Ω_Λ),   Ω_Λ = 1 − Ω_m − Ω_r,
 * and the static (a = 1) background of non-cosmological runs.
 * All times and rates are in the run's code units; the background only
 * needs H0 in those units.
 */
import { integrate } from "../../math/quadrature.js";
import { GrowthTable } from "./growth.js";

/** Parameters of a flat ΛCDM background in code units. */
export interface LcdmParameters {
  /** H0 in inverse code time units. */
  readonly hubble0: number;
  /** Ω_m, matter density today in units of the critical density. */
  readonly omegaMatter: number;
  /** Ω_r, radiation density today (default 0). */
  readonly omegaRadiation: number;
}

/** The scale factor as a function of cosmic time and the split-step factors. */
export interface Background {
  readonly kind: "static" | "lcdm";
  /** Scale factor at cosmic time t. */
  scaleFactor(t: number): number;
  /** Cosmic time at scale factor a (static: only a = 1 is meaningful). */
  time(a: number): number;
  /** Hubble rate H(a) (0 for a static background). */
  hubble(a: number): number;
  /** D = ∫ dt / a² over [t1, t2] (the drift factor). */
  driftFactor(t1: number, t2: number): number;
  /** K = ∫ dt / a over [t1, t2] (the kick factor). */
  kickFactor(t1: number, t2: number): number;
  /** Linear growth factor D(a), normalised to D → a in the matter era. */
  growth(a: number): number;
  /** Growth rate f = d ln D / d ln a. */
  growthRate(a: number): number;
}

/** A non-expanding background: a = 1, t is the ordinary time. */
export class StaticBackground implements Background {
  readonly kind = "static" as const;
  scaleFactor(): number {
    return 1;
  }
  time(): number {
    return 0;
  }
  hubble(): number {
    return 0;
  }
  driftFactor(t1: number, t2: number): number {
    return t2 - t1;
  }
  kickFactor(t1: number, t2: number): number {
    return t2 - t1;
  }
  growth(): number {
    return 1;
  }
  growthRate(): number {
    return 0;
  }
}

/** Flat ΛCDM (+ radiation) background, cosmic time t measured from the big bang. */
export class LcdmBackground implements Background {
  readonly kind = "lcdm" as const;
  readonly params: LcdmParameters;
  readonly omegaLambda: number;
  private readonly recent: [number, number][] = [];
  private growthTable: GrowthTable | undefined;

  constructor(params: LcdmParameters) {
    this.params = params;
    this.omegaLambda = 1 - params.omegaMatter - params.omegaRadiation;
  }

  /** E(a) = H(a)/H0. */
  e(a: number): number {
    const { omegaMatter: m, omegaRadiation: r } = this.params;
    return Math.sqrt(r / (a * a * a * a) + m / (a * a * a) + this.omegaLambda);
  }

  hubble(a: number): number {
    return this.params.hubble0 * this.e(a);
  }

  /** t(a) = ∫₀^a da/(a H), integrated in u = √a where the integrand is smooth. */
  time(a: number): number {
    const { omegaMatter: m, omegaRadiation: r, hubble0 } = this.params;
    const lam = this.omegaLambda;
    const f = (u: number): number => {
      const u2 = u * u;
      return (2 * u2 * u) / Math.sqrt(r + m * u2 + lam * u2 * u2 * u2 * u2);
    };
    return integrate(f, 0, Math.sqrt(a)) / hubble0;
  }

  /**
   * a(t) by Newton iteration (dt/da = 1/(a H)) from the matter-era guess
   * a ∝ t^(2/3). The result depends on t alone, never on earlier calls, so a
   * resumed run reproduces an uninterrupted one bit for bit; the last few
   * answers are remembered by their exact t.
   */
  scaleFactor(t: number): number {
    for (const [tc, ac] of this.recent) if (tc === t) return ac;
    let a = Math.pow(1.5 * this.params.hubble0 * Math.sqrt(this.params.omegaMatter) * t, 2 / 3);
    let ta = this.time(a);
    for (let iter = 0; iter < 100; iter++) {
      const da = (t - ta) * a * this.hubble(a);
      const next = Math.max(a + da, 0.5 * a);
      if (Math.abs(next - a) <= 1e-15 * a) {
        a = next;
        break;
      }
      ta += this.interval(a, next, 0);
      a = next;
    }
    this.recent.unshift([t, a]);
    if (this.recent.length > 8) this.recent.pop();
    return a;
  }

  /** ∫ dt / a^p over the scale-factor interval [a1, a2] = ∫ da / (a^(p+1) H(a)). */
  private interval(a1: number, a2: number, p: number): number {
    if (a1 === a2) return 0;
    return integrate((a) => 1 / (Math.pow(a, p + 1) * this.hubble(a)), a1, a2);
  }

  driftFactor(t1: number, t2: number): number {
    return this.interval(this.scaleFactor(t1), this.scaleFactor(t2), 2);
  }

  kickFactor(t1: number, t2: number): number {
    return this.interval(this.scaleFactor(t1), this.scaleFactor(t2), 1);
  }

  private table(): GrowthTable {
    this.growthTable ??= new GrowthTable(this);
    return this.growthTable;
  }

  growth(a: number): number {
    return this.table().growth(a);
  }

  growthRate(a: number): number {
    return this.table().growthRate(a);
  }
}

/** A background described by plain data (code units), as stored in a resolved run. */
export type BackgroundSpec =
  | { readonly kind: "static" }
  | {
      readonly kind: "lcdm";
      /** H0 [1/code time]. */
      readonly hubble0: number;
      readonly omegaMatter: number;
      readonly omegaRadiation: number;
      /** H0 / (100 km/s/Mpc). */
      readonly littleH: number;
    };

/** Build the background a spec describes. */
export function makeBackground(spec: BackgroundSpec): Background {
  if (spec.kind === "static") return new StaticBackground();
  return new LcdmBackground({ hubble0: spec.hubble0, omegaMatter: spec.omegaMatter, omegaRadiation: spec.omegaRadiation });
}
