/**
 * Conversions from a run's code units to the physical units psibox writes:
 * times in the run's output time unit, masses in Msun, energies in
 * Msun (km/s)², densities in Msun/kpc³. In 1D and 2D runs the totals are per
 * code length along each missing axis, i.e. over a depth equal to the first
 * box side (the field is uniform along the missing axes).
 */
import { CodeUnits } from "../physics/units.js";
import { M_SUN_KG, PC_M } from "../physics/constants.js";
import type { ResolvedRun } from "../config/resolve.js";

/** Code-to-physical factors of one run. */
export class OutputScales {
  readonly units: CodeUnits;
  /** Output time unit name, e.g. "Myr". */
  readonly timeUnit: string;
  private readonly timeFactor: number;

  constructor(run: ResolvedRun) {
    this.units = new CodeUnits(run.particleMassKg, run.lengthUnitM);
    this.timeUnit = run.output.timeUnit;
    this.timeFactor = this.units.timeS / run.output.timeUnitS;
  }

  /** Code time → output time unit. */
  time(t: number): number {
    return t * this.timeFactor;
  }

  /** Output time unit → code time. */
  codeTime(t: number): number {
    return t / this.timeFactor;
  }

  /** Code mass → Msun. */
  massMsun(m: number): number {
    return (m * this.units.massKg) / M_SUN_KG;
  }

  /** Code energy → Msun (km/s)². */
  energy(e: number): number {
    return (e * this.units.energyJ) / (M_SUN_KG * 1e6);
  }

  /** Code density → Msun/kpc³. */
  density(rho: number): number {
    const kpc = 1e3 * PC_M;
    return ((rho * this.units.massKg) / this.units.lengthM ** 3) * (kpc ** 3 / M_SUN_KG);
  }

  /** "12.5 Myr"-style text for messages. */
  formatTime(t: number): string {
    return `${this.time(t).toPrecision(6)} ${this.timeUnit}`;
  }
}
