/**
 * Conservation checks from a run's time series (pure functions): the
 * relative mass drift, the relative drift of K + W + U in static runs, and
 * in expanding runs the residual of the Layzer–Irvine equation
 * d(K + W + U)/dt + H (2K + W + 3U) = 0 (Layzer 1963; Irvine 1961; the
 * contact energy U = ½g∫ρ²/a³, 0 without an interaction, scales as a⁻³ at a
 * fixed comoving field, as K as a⁻² and W as a⁻¹), integrated as
 *
 *     R(t) = (K + W + U)(t) − (K + W + U)(t₀) + ∫ (2K + W + 3U) d ln a,
 *
 * by the trapezoid rule in ln a over the rows (U's term by the logarithmic mean, exact for a power of a),
 * relative to |W(t)|. In an
 * expanding box K + W + U itself is not conserved (the expansion takes
 * energy out), so R, not its drift, shows whether the solver keeps energy.
 */

export interface EnergyRow {
  readonly t: number;
  /** Scale factor (expanding runs). */
  readonly a?: number;
  readonly mass: number;
  readonly kinetic: number;
  readonly potential: number;
  /** The contact interaction energy U (0 without one). */
  readonly contact?: number;
}

export interface Drift {
  readonly t: number;
  /** (M − M₀)/M₀. */
  readonly mass: number;
  /** Static: (E − E₀)/|E₀|; expanding: the Layzer–Irvine residual R/|W|. */
  readonly energy: number;
}

/**
 * The mean of a quantity over an interval in ln a from its two ends, exact for a power of a: the
 * logarithmic mean (y₂ − y₁)/ln(y₂/y₁), or the trapezoid's when the ends differ in sign or are equal.
 * U of a nearly uniform field falls as a⁻³ and can exceed |W| by many orders, so the trapezoid's error on
 * it, (3Δln a)²/12 of U per interval, would swamp the residual (K and W keep the trapezoid: their
 * residual is second order, as the tests measure).
 */
function powerLawMean(y1: number, y2: number): number {
  if (y1 === y2 || !(y1 / y2 > 0)) return 0.5 * (y1 + y2);
  return (y2 - y1) / Math.log(y2 / y1);
}

/** The drifts at every row. */
export function conservationDrifts(rows: readonly EnergyRow[]): Drift[] {
  if (rows.length === 0) return [];
  const r0 = rows[0]!;
  const e0 = r0.kinetic + r0.potential + (r0.contact ?? 0);
  const expanding = r0.a !== undefined;
  let integral = 0;
  return rows.map((r, i) => {
    const e = r.kinetic + r.potential + (r.contact ?? 0);
    let energy: number;
    if (expanding) {
      if (i > 0) {
        const p = rows[i - 1]!;
        const dlna = Math.log(r.a! / p.a!);
        integral += 0.5 * (2 * p.kinetic + p.potential + 2 * r.kinetic + r.potential) * dlna + 3 * powerLawMean(p.contact ?? 0, r.contact ?? 0) * dlna;
      }
      energy = (e - e0 + integral) / Math.abs(r.potential);
    } else energy = e0 === 0 ? NaN : (e - e0) / Math.abs(e0);
    return { t: r.t, mass: (r.mass - r0.mass) / r0.mass, energy };
  });
}

/** The energy rows of a time-series table (columns as psibox run writes them). */
export function energyRows(rows: readonly Record<string, number | string>[], tCol: string): EnergyRow[] {
  return rows.map((r) => ({
    t: Number(r[tCol]),
    ...(r["a"] !== undefined ? { a: Number(r["a"]) } : {}),
    mass: Number(r["mass_Msun"]),
    kinetic: Number(r["kinetic_Msun_km2_s2"]),
    potential: Number(r["potential_Msun_km2_s2"]),
    contact: r["contact_Msun_km2_s2"] !== undefined ? Number(r["contact_Msun_km2_s2"]) : 0,
  }));
}
