/**
 * The vortex census's scan (vortices.ts): which plaquettes of a 2D or 3D grid
 * the phase of ψ winds around, and by how much. The charge of a plaquette is
 * the sum of its four edges' phase differences, each wrapped into (−π, π],
 * over 2π; here without a phase per cell. Each cell's quarter of the complex
 * plane (by the signs of Re ψ and Im ψ) gives each edge its quarter-turns: 0
 * within a quarter, ±1 into the next, ±2 into the opposite one by the sign of
 * Im(ψ̄_a ψ_b). Around a plaquette they add up to four times its charge. An
 * edge whose phase step could lie within 1e-12 of ±π (its corners nearly
 * opposite, tiny or not finite), or that touches a cell where ψ is zero or
 * NaN, is unsure: its plaquettes take the phases (atan2) as the definition
 * says. Everywhere else the wrapped phase differences, computed in doubles,
 * lie more than 1e-12 from the wrap while their round-off is about 1e-15, so
 * the charges are the same as the phases give, plaquette for plaquette.
 *
 * The scan goes plane by plane along the first axis, keeping the quarters and
 * edges of two planes at a time (plane a and the next, periodic): no
 * grid-sized scratch, each edge found once.
 */
import type { Grid } from "../grid/grid.js";

/** The plaquettes' orientations: spanned by axes (p, q), normal r (3D) or none (2D). */
export function orientationsOf(grid: Grid): [number, number, number][] {
  return grid.dims === 2 ? [[1, 2, -1]] : [[1, 2, 0], [2, 0, 1], [0, 1, 2]];
}

/**
 * Index steps along `axis` from the cells of row (a, b); 0 for the last axis, whose wrap is taken per cell
 * (a simulated first or second axis has at least two cells, so its step is never 0). `local`: the steps in the
 * scan's two planes (plane a, then plane a + 1 whatever a is), where a step along the first axis never wraps.
 */
function rowStep(grid: Grid, axis: number, a: number, b: number, local: boolean): number {
  const n0 = grid.shape[0];
  const n1 = grid.shape[1];
  const n2 = grid.shape[2];
  if (axis === 0) return a === n0 - 1 && !local ? -(n0 - 1) * n1 * n2 : n1 * n2;
  if (axis === 1) return b === n1 - 1 ? -(n1 - 1) * n2 : n2;
  return 0;
}

/** Little-endian doubles: the high word of double k is word 2k + 1 of an Int32Array view (else 2k). */
const HIGH = new Uint8Array(new Float64Array([-0]).buffer)[7] === 0x80 ? 1 : 0;

/**
 * Each cell's quarter of the complex plane, counter-clockwise by the sign bits of Re ψ and Im ψ: 0 (+, +), 1 (−, +),
 * 2 (−, −), 3 (+, −); the phase atan2 gives a cell lies in the closed arc of its quarter (mod 2π), for every sign
 * of zero and for ψ = 0 too. A NaN has no phase: a plane with one (or an infinity) is redone with NONE there.
 */
function quarters(psi: Float64Array, words: Int32Array, from: number, count: number, out: Uint8Array, at: number): void {
  let finite = 0;
  for (let i = 2 * from, end = 2 * (from + count), w = 4 * from + HIGH; i < end; i += 2, w += 4, at++) {
    const below = words[w + 2]! >>> 31;
    out[at] = 2 * below + ((words[w]! >>> 31) ^ below);
    finite += psi[i]! - psi[i]! + (psi[i + 1]! - psi[i + 1]!); // NaN once any value is NaN or infinite
  }
  if (finite === 0) return;
  for (let i = 2 * from, end = 2 * (from + count), k = at - count; i < end; i += 2, k++) if (Number.isNaN(psi[i]!) || Number.isNaN(psi[i + 1]!)) out[k] = NONE;
}

/** A cell without a quarter (NaN). */
const NONE = 4;
/** The code of an edge only the phases can settle; the other codes are the quarter-turns + 2 (0 … 4), so this bit is its alone. */
const UNSURE = 8;

/**
 * The code of the edge from cell a to cell b, in quarters qa and qb. Sure only if |Im(ψ̄_a ψ_b)| exceeds
 * 1e-12 (|Re ψ_a| + |Im ψ_a|)(|Re ψ_b| + |Im ψ_b|), the latter above 1e-280 (far from underflow): then
 * |sin Δφ| > 1e-12, the phase step Δφ lies more than 1e-12 from ±π, and the cross product's sign is its true sign.
 */
function edgeCode(psi: Float64Array, a: number, b: number, qa: number, qb: number): number {
  if ((qa | qb) & NONE) return UNSURE;
  const turn = (qb - qa) & 3;
  if (turn === 0) return 2;
  const ar = psi[2 * a]!;
  const ai = psi[2 * a + 1]!;
  const br = psi[2 * b]!;
  const bi = psi[2 * b + 1]!;
  const cross = ar * bi - ai * br;
  const scale = (Math.abs(ar) + Math.abs(ai)) * (Math.abs(br) + Math.abs(bi));
  if (!(Math.abs(cross) > 1e-12 * scale && scale > 1e-280)) return UNSURE;
  return turn === 1 ? 3 : turn === 3 ? 1 : cross > 0 ? 4 : 0;
}

/**
 * The edge codes of one row's cells along axes 1 and 2 (steps s1 and, wrapping at the row's end, 1), from cell `li`
 * of the planes and `gi` of the grid, as the cells' words: code along axis k in bits 4k … 4k + 3 (axis 0's added later).
 */
function rowEdges(psi: Float64Array, quarter: Uint8Array, out: Uint16Array, n2: number, li: number, gi: number, s1: number): void {
  for (let c = 0; c < n2; c++, li++, gi++) {
    const d2 = c === n2 - 1 ? -(n2 - 1) : 1;
    const q = quarter[li]!;
    const q1 = quarter[li + s1]!;
    const q2 = quarter[li + d2]!;
    const e1 = q === q1 && q !== NONE ? 2 : edgeCode(psi, gi, gi + s1, q, q1);
    const e2 = q === q2 && q !== NONE ? 2 : edgeCode(psi, gi, gi + d2, q, q2);
    out[li] = (e1 << 4) | (e2 << 8);
  }
}

/** Adds the codes of one row's edges along axis 0 (to the next plane: `s0` in the planes, `g0` in the grid) to its words. */
function rowEdges0(psi: Float64Array, quarter: Uint8Array, out: Uint16Array, n2: number, li: number, gi: number, s0: number, g0: number): void {
  for (let c = 0; c < n2; c++, li++, gi++) {
    const q = quarter[li]!;
    const q0 = quarter[li + s0]!;
    out[li] = out[li]! | (q === q0 && q !== NONE ? 2 : edgeCode(psi, gi, gi + g0, q, q0));
  }
}

/** The phase of cell i. */
function phaseOf(psi: Float64Array, i: number): number {
  return Math.atan2(psi[2 * i + 1]!, psi[2 * i]!);
}

function wrap(d: number): number {
  return d > Math.PI ? d - 2 * Math.PI : d <= -Math.PI ? d + 2 * Math.PI : d;
}

/** A plaquette's charge by the definition: the phases of its corners 0, p, pq, q, the four wrapped differences' sum / 2π, rounded. */
function phaseCharge(psi: Float64Array, i0: number, ip: number, ipq: number, iq: number): number {
  const [f0, fp, fpq, fq] = [phaseOf(psi, i0), phaseOf(psi, ip), phaseOf(psi, ipq), phaseOf(psi, iq)];
  const w = wrap(fp - f0) + wrap(fpq - fp) + wrap(fq - fpq) + wrap(f0 - fq);
  return Math.round(w / (2 * Math.PI));
}

/** Numbers per pierced plaquette in scanPlanes' lists: cell, charge, grid step p, grid step q, length. */
export const HIT = 5;

/** The length a piercing of the plaquette at cell i spanned by grid steps tp, tq of orientation o stands for, measured while its planes are in cache. */
export type PiercingLength = (i: number, tp: number, tq: number, o: number) => number;

/**
 * The plaquette at cell i of orientation o spanned by grid steps tp, tq, given its loop's four edge codes (0 → p,
 * p → pq, then back from pq to q and from q to 0, the last two as stored from q and from 0): into `hits` if it winds.
 */
function plaquette(psi: Float64Array, hits: number[], length: PiercingLength | undefined, o: number, i: number, tp: number, tq: number, e0: number, e1: number, e2: number, e3: number): void {
  const turns = e0 + e1 - e2 - e3;
  const sure = ((e0 | e1 | e2 | e3) & UNSURE) === 0 && (turns & 3) === 0;
  const charge = sure ? turns / 4 : phaseCharge(psi, i, i + tp, i + tp + tq, i + tq);
  if (charge !== 0) hits.push(i, charge, tp, tq, length ? length(i, tp, tq, o) : 0);
}

/**
 * One row's plaquettes of every orientation at once from the cells' words: at cell i (plane index li, grid index
 * gi) those spanned by axes (1, 2), (2, 0) and (0, 1), with steps s1 along axis 1, 1 along axis 2 (wrapping at the
 * row's end) and s0 (planes) or g0 (grid) along axis 0; in 2D the first only (no axis-0 codes: s0 = 0).
 */
function plaquetteRow(psi: Float64Array, word: Uint16Array, hits: number[][], length: PiercingLength | undefined, n2: number, li: number, gi: number, s1: number, s0: number, g0: number): void {
  const three = hits.length === 3;
  for (let c = 0; c < n2; c++, li++, gi++) {
    const d2 = c === n2 - 1 ? -(n2 - 1) : 1;
    const w = word[li]!;
    const w1 = word[li + s1]!;
    const w2 = word[li + d2]!;
    const w0 = word[li + s0]!;
    const x0 = w & 15;
    const x1 = (w >> 4) & 15;
    const x2 = w >> 8;
    // Σ of the loop's quarter-turns (the codes' offsets cancel) of (1, 2), (2, 0), (0, 1): zero unless pierced
    const t12 = x1 + (w1 >> 8) - ((w2 >> 4) & 15) - x2;
    const t20 = x2 + (w2 & 15) - (w0 >> 8) - x0;
    const t01 = x0 + ((w0 >> 4) & 15) - (w1 & 15) - x1;
    if ((t12 | t20 | t01 | ((w | w1 | w2 | w0) & 0x888)) === 0) continue;
    plaquette(psi, hits[0]!, length, 0, gi, s1, d2, x1, w1 >> 8, (w2 >> 4) & 15, x2);
    if (!three) continue;
    plaquette(psi, hits[1]!, length, 1, gi, d2, g0, x2, w2 & 15, w0 >> 8, x0);
    plaquette(psi, hits[2]!, length, 2, gi, g0, s1, x0, (w0 >> 4) & 15, w1 & 15, x1);
  }
}

/**
 * The pierced plaquettes of each orientation (orientationsOf), each list in storage order as (cell, charge, grid
 * step p, grid step q, length), HIT numbers each (the length by `length`, 0 without): plane by plane along the first
 * axis, with the quarters and edge codes of two planes at a time (plane a and the next, periodic).
 */
export function scanPlanes(grid: Grid, psi: Float64Array, length?: PiercingLength): number[][] {
  const [n0, n1, n2] = grid.shape;
  const plane = n1 * n2;
  const three = grid.dims === 3;
  const span = three ? 2 * plane : plane;
  const words = new Int32Array(psi.buffer, psi.byteOffset, 2 * psi.length);
  const quarter = new Uint8Array(span);
  const word = new Uint16Array(span);
  const hits = orientationsOf(grid).map((): number[] => []);
  const edges = (a: number, base: number) => {
    quarters(psi, words, a * plane, plane, quarter, base);
    for (let b = 0; b < n1; b++) rowEdges(psi, quarter, word, n2, base + b * n2, (a * n1 + b) * n2, rowStep(grid, 1, a, b, true));
  };
  edges(0, 0);
  for (let a = 0; a < n0; a++) {
    const g0 = rowStep(grid, 0, a, 0, false);
    if (three) {
      edges((a + 1) % n0, plane);
      for (let b = 0; b < n1; b++) rowEdges0(psi, quarter, word, n2, b * n2, (a * n1 + b) * n2, plane, g0);
    }
    for (let b = 0; b < n1; b++) plaquetteRow(psi, word, hits, length, n2, b * n2, (a * n1 + b) * n2, rowStep(grid, 1, a, b, true), three ? plane : 0, g0);
    if (three) for (const m of [quarter, word]) m.copyWithin(0, plane, 2 * plane);
  }
  return hits;
}
