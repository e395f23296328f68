/**
 * The elementwise passes of a tangent-linear field dψ beside the reference
 * field ψ, as functions of a row range (the same arithmetic per cell for any
 * thread count). The linearised kick of the split-step with contact term g,
 *   dψ ← e^{−iK(φ + g|ψ|²)} (dψ − iK(dφ + 2g Re(ψ̄ dψ)) ψ),   ∇²dφ = 2 Re(ψ̄ dψ),
 * is `crossDensityRows` (the source of dφ), the Poisson passes, then
 * `tangentSourceRows` (the linear term) and the kick of ψ's phase. The projections
 * onto ψ (the neutral directions of the flow) are `overlapRows` and
 * `combineRows`. A row is one run of the last axis, n2 cells.
 */

/** target ← 2 Re(ψ̄ dψ) over rows [lo, hi). */
export function crossDensityRows(psi: Float64Array, field: Float64Array, target: Float64Array, n2: number, lo: number, hi: number): void {
  for (let i = lo * n2; i < hi * n2; i++) {
    target[i] = 2 * (psi[2 * i]! * field[2 * i]! + psi[2 * i + 1]! * field[2 * i + 1]!);
  }
}

/**
 * dψ ← dψ − i·K·(dφ + 2g Re(ψ̄ dψ))·ψ over rows [lo, hi), K = `factor`, g = `contact`
 * (the kick's linear term, before its phase; the contact term's derivative is 2g Re(ψ̄ dψ)).
 */
export function tangentSourceRows(psi: Float64Array, field: Float64Array, dphi: Float64Array, factor: number, n2: number, lo: number, hi: number, contact = 0): void {
  for (let i = lo * n2; i < hi * n2; i++) {
    const dv = contact === 0 ? dphi[i]! : dphi[i]! + 2 * contact * (psi[2 * i]! * field[2 * i]! + psi[2 * i + 1]! * field[2 * i + 1]!);
    const g = factor * dv;
    // −i g (ψr + i ψi) = g ψi − i g ψr
    field[2 * i] = field[2 * i]! + g * psi[2 * i + 1]!;
    field[2 * i + 1] = field[2 * i + 1]! - g * psi[2 * i]!;
  }
}

/** Over rows [lo, hi): out[0] = Σ Re(ψ̄ dψ), out[1] = Σ Im(ψ̄ dψ), out[2] = Σ|dψ|², out[3] = 0. */
export function overlapRows(psi: Float64Array, field: Float64Array, n2: number, lo: number, hi: number, out: Float64Array): void {
  let re = 0;
  let im = 0;
  let norm = 0;
  for (let i = lo * n2; i < hi * n2; i++) {
    const pr = psi[2 * i]!;
    const pi = psi[2 * i + 1]!;
    const fr = field[2 * i]!;
    const fi = field[2 * i + 1]!;
    re += pr * fr + pi * fi;
    im += pr * fi - pi * fr;
    norm += fr * fr + fi * fi;
  }
  out[0] = re;
  out[1] = im;
  out[2] = norm;
  out[3] = 0;
}

/** dψ ← scale·(dψ − (cr + i·ci)ψ) over rows [lo, hi). */
export function combineRows(psi: Float64Array, field: Float64Array, scale: number, cr: number, ci: number, n2: number, lo: number, hi: number): void {
  for (let i = lo * n2; i < hi * n2; i++) {
    const pr = psi[2 * i]!;
    const pi = psi[2 * i + 1]!;
    field[2 * i] = scale * (field[2 * i]! - (cr * pr - ci * pi));
    field[2 * i + 1] = scale * (field[2 * i + 1]! - (cr * pi + ci * pr));
  }
}
