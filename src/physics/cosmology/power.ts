/**
 * Linear matter power spectrum of wave (fuzzy) dark matter:
 *   P(k) = A k^{n_s} T_CDM(k)² T_FDM(k)²,  k in 1/Mpc, P in Mpc³,
 * normalised to σ₈ (top-hat of 8 Mpc/h) at z = 0.
 *
 * T_CDM: Eisenstein & Hu 1998 (ApJ 496, 605), the shape without baryon
 * oscillations (their eqs. 26, 28–31), or BBKS (Bardeen, Bond, Kaiser &
 * Szalay 1986, ApJ 304, 15, eq. G3) with q = k Θ²/(Ω_m h²), Θ = T_CMB/2.7 K
 * (no baryon term).
 * T_FDM: Hu, Barkana & Gruzinov 2000 (PRL 85, 1158):
 *   T_FDM = cos(x³)/(1 + x⁸),  x = 1.61 m₂₂^{1/18} k/k_Jeq,  k_Jeq = 9 m₂₂^{1/2} Mpc⁻¹.
 */
import { integrate } from "../../math/quadrature.js";
import { interpolateTable, type TabulatedSpectrum } from "./tabulated.js";

/** Parameters of the spectrum. */
export interface PowerParameters {
  /** h = H0/(100 km/s/Mpc). */
  readonly littleH: number;
  readonly omegaMatter: number;
  /** Ω_b (baryons; used by Eisenstein & Hu only). */
  readonly omegaBaryon: number;
  /** CMB temperature [K]. */
  readonly cmbTemperature: number;
  readonly spectralIndex: number;
  readonly sigma8: number;
  readonly transfer: "eisenstein-hu" | "bbks" | "table";
  /** transfer = "table": the user's P(k) [Mpc³] (used as given) or T(k) (normalised to sigma8), k in 1/Mpc. */
  readonly table?: TabulatedSpectrum;
  /** m c² / 1e-22 eV; undefined switches the wave suppression off. */
  readonly m22: number | undefined;
}

/** Eisenstein & Hu 1998 no-wiggle transfer function; k in 1/Mpc. */
export function transferEisensteinHu(k: number, p: Pick<PowerParameters, "littleH" | "omegaMatter" | "omegaBaryon" | "cmbTemperature">): number {
  const h = p.littleH;
  const om = p.omegaMatter * h * h;
  const ob = p.omegaBaryon * h * h;
  const fb = p.omegaBaryon / p.omegaMatter;
  const theta = p.cmbTemperature / 2.7;
  const s = (44.5 * Math.log(9.83 / om)) / Math.sqrt(1 + 10 * Math.pow(ob, 0.75));
  const alpha = 1 - 0.328 * Math.log(431 * om) * fb + 0.38 * Math.log(22.3 * om) * fb * fb;
  const gamma = p.omegaMatter * h * (alpha + (1 - alpha) / (1 + Math.pow(0.43 * k * s, 4)));
  const q = ((k / h) * theta * theta) / gamma;
  const L0 = Math.log(2 * Math.E + 1.8 * q);
  const C0 = 14.2 + 731 / (1 + 62.5 * q);
  return L0 / (L0 + C0 * q * q);
}

/** BBKS transfer function, q = k Θ²/(Ω_m h²); k in 1/Mpc. */
export function transferBbks(k: number, p: Pick<PowerParameters, "littleH" | "omegaMatter" | "cmbTemperature">): number {
  const theta = p.cmbTemperature / 2.7;
  const q = (k * theta * theta) / (p.omegaMatter * p.littleH * p.littleH);
  if (q === 0) return 1;
  return (Math.log(1 + 2.34 * q) / (2.34 * q)) * Math.pow(1 + 3.89 * q + (16.1 * q) ** 2 + (5.46 * q) ** 3 + (6.71 * q) ** 4, -0.25);
}

/** Wave-dark-matter suppression of Hu, Barkana & Gruzinov 2000; k in 1/Mpc. */
export function transferFdm(k: number, m22: number): number {
  const kJeq = 9 * Math.sqrt(m22);
  const x = (1.61 * Math.pow(m22, 1 / 18) * k) / kJeq;
  return Math.cos(x * x * x) / (1 + Math.pow(x, 8));
}

/** Fourier transform of a spherical top-hat, W(x) = 3(sin x − x cos x)/x³. */
export function topHat(x: number): number {
  if (x < 1e-3) return 1 - (x * x) / 10;
  return (3 * (Math.sin(x) - x * Math.cos(x))) / (x * x * x);
}

/** The normalised linear spectrum at z = 0. */
export class LinearPower {
  readonly params: PowerParameters;
  /** Amplitude A such that σ(8 Mpc/h) = σ₈. */
  readonly amplitude: number;

  constructor(params: PowerParameters) {
    this.params = params;
    // a tabulated P(k) is used as given; formulas and tabulated T(k) are normalised to σ₈
    this.amplitude = params.table?.quantity === "power" ? 1 : (params.sigma8 * params.sigma8) / this.sigmaSquared(8 / params.littleH, 1);
  }

  /** T_CDM(k) T_FDM(k). */
  transfer(k: number): number {
    const p = this.params;
    const fdm = p.m22 === undefined ? 1 : transferFdm(k, p.m22);
    const t = p.table;
    if (t?.quantity === "transfer") return interpolateTable(t, k) * fdm;
    // a tabulated P(k): the transfer function it implies, 1 at the table's first k
    if (t) return Math.sqrt((interpolateTable(t, k) / t.values[0]!) * Math.pow(t.k[0]! / k, p.spectralIndex)) * fdm;
    return (p.transfer === "bbks" ? transferBbks(k, p) : transferEisensteinHu(k, p)) * fdm;
  }

  /** P(k) with a given amplitude (a tabulated P(k) is used as given). */
  private powerWith(k: number, amp: number): number {
    const p = this.params;
    if (p.table?.quantity === "power") {
      const fdm = p.m22 === undefined ? 1 : transferFdm(k, p.m22);
      return interpolateTable(p.table, k) * fdm * fdm;
    }
    const t = this.transfer(k);
    return amp * Math.pow(k, p.spectralIndex) * t * t;
  }

  /** P(k) at z = 0 [Mpc³], k in 1/Mpc. */
  at(k: number): number {
    if (k <= 0) return 0;
    return this.powerWith(k, this.amplitude);
  }

  /** σ²(R) = ∫ k² P(k) W²(kR) dk / (2π²) for amplitude `amp`, R in Mpc. */
  sigmaSquared(radius: number, amp = this.amplitude): number {
    const f = (lnk: number) => {
      const k = Math.exp(lnk);
      const w = topHat(k * radius);
      return (k * k * k * this.powerWith(k, amp) * w * w) / (2 * Math.PI * Math.PI);
    };
    // a table is integrated over its own range (resolution checks that it covers the σ₈ integrand)
    const t = this.params.table;
    return integrate(f, Math.log(t ? t.k[0]! : 1e-5), Math.log(t ? t.k[t.k.length - 1]! : 1e3), 1e-10);
  }
}
