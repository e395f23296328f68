/**
 * Whether the grid resolves the field's flow. A wave function sampled at
 * spacing Δx carries phase steps between neighbouring cells of at most π:
 * the fastest peculiar flow it can represent is v_max = π ħ / (m a Δx)
 * (faster flows alias onto slower ones, and structure stops growing as it
 * should). psibox flags a link between neighbouring cells whose phase step
 * exceeds 3π/4, a local flow within a quarter of that limit, and reports
 * the fraction of the mass in cells with such a link along any simulated
 * axis. The test is cos Δφ < cos(3π/4) on Re(ψ_{i+1} conj ψ_i) (no
 * arctangent). Nodes of the field (vortex cores, interference zeros) have
 * phase jumps of any size but hold almost no mass, so the mass weighting
 * leaves them out. (The threshold was chosen on cosmological boxes at two
 * resolutions: the growth of the largest modes stays within 2% of linear
 * theory while under 1% of the mass is flagged; computed independently.)
 */
import type { Grid } from "../grid/grid.js";

/** The phase step between neighbouring cells above which psibox calls the flow unresolved. */
export const UNRESOLVED_PHASE_STEP = (3 * Math.PI) / 4;

/** How well a field's flow is resolved. */
export interface FlowResolution {
  /** Fraction of the mass in cells with a phase step above the threshold to a neighbour along some simulated axis. */
  readonly unresolvedMassFraction: number;
  /** Largest |phase step| over links whose two cells both hold at least the mean density (radians, ≤ π). */
  readonly largestDenseStep: number;
}

/**
 * The flow resolution of ψ (interleaved re, im; periodic links).
 * @param psi the field on `grid`
 * @param threshold the phase step (radians, in (0, π)) above which a link counts as unresolved
 */
export function flowResolution(grid: Grid, psi: Float64Array, threshold = UNRESOLVED_PHASE_STEP): FlowResolution {
  const cosine = Math.cos(threshold);
  const [n0, n1, n2] = grid.shape;
  const strides = [n1 * n2, n2, 1] as const;
  const counts = [n0, n1, n2] as const;
  let mass = 0;
  for (let p = 0; p < grid.size; p++) mass += psi[2 * p]! * psi[2 * p]! + psi[2 * p + 1]! * psi[2 * p + 1]!;
  const mean = mass / grid.size;
  let flagged = 0;
  let largest = 0;
  const index = [0, 0, 0];
  for (let p = 0; p < grid.size; p++) {
    index[0] = Math.floor(p / strides[0]);
    index[1] = Math.floor(p / n2) % n1;
    index[2] = p % n2;
    const re = psi[2 * p]!;
    const im = psi[2 * p + 1]!;
    const rho = re * re + im * im;
    let unresolved = false;
    for (let ax = 0; ax < 3; ax++) {
      if (counts[ax]! === 1) continue;
      const q = index[ax]! + 1 === counts[ax]! ? p - (counts[ax]! - 1) * strides[ax]! : p + strides[ax]!;
      const qr = psi[2 * q]!;
      const qi = psi[2 * q + 1]!;
      const dot = qr * re + qi * im;
      if (dot < cosine * Math.sqrt(rho * (qr * qr + qi * qi))) unresolved = true;
      if (rho >= mean && qr * qr + qi * qi >= mean) largest = Math.max(largest, Math.abs(Math.atan2(qi * re - qr * im, dot)));
    }
    if (unresolved) flagged += rho;
  }
  return { unresolvedMassFraction: mass > 0 ? flagged / mass : 0, largestDenseStep: largest };
}

/** The fastest peculiar flow (code velocity, ħ/m = 1) a spacing `dx` (comoving) represents at scale factor `a`: π / (a dx). */
export function fastestFlow(dx: number, a: number): number {
  return Math.PI / (a * dx);
}
