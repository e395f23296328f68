/**
 * The densest points of a field and radial profiles around them, in code
 * units: local maxima of ρ = |ψ|² along every simulated axis (periodic),
 * taken densest first with a minimum separation, and shell averages of ρ
 * with minimum-image distances.
 */
import type { Grid } from "../grid/grid.js";
import type { BlockTables } from "./block-tables.js";

/** A max-heap of cell indices ordered by ρ descending, then index ascending (the order of a stable sort by ρ). */
class PeakHeap {
  private readonly items: Int32Array;
  private size: number;

  constructor(private readonly rho: Float64Array, candidates: Int32Array) {
    this.items = candidates;
    this.size = candidates.length;
    for (let i = (this.size >> 1) - 1; i >= 0; i--) this.down(i);
  }

  /** Whether cell x comes before cell y. */
  private before(x: number, y: number): boolean {
    const rx = this.rho[x]!;
    const ry = this.rho[y]!;
    return rx > ry || (rx === ry && x < y);
  }

  private down(i: number): void {
    const h = this.items;
    for (;;) {
      const l = 2 * i + 1;
      if (l >= this.size) return;
      const c = l + 1 < this.size && this.before(h[l + 1]!, h[l]!) ? l + 1 : l;
      if (!this.before(h[c]!, h[i]!)) return;
      const t = h[i]!;
      h[i] = h[c]!;
      h[c] = t;
      i = c;
    }
  }

  /** The next cell, or −1 when none is left. */
  pop(): number {
    if (this.size === 0) return -1;
    const top = this.items[0]!;
    this.items[0] = this.items[--this.size]!;
    this.down(0);
    return top;
  }
}

/** Cells at least as dense as their neighbours along every simulated axis (periodic), in storage order. */
function peakCandidates(grid: Grid, rho: Float64Array): Int32Array {
  const [n0, n1, n2] = grid.shape;
  const s0 = n1 * n2;
  const out: number[] = [];
  let i = 0;
  for (let a = 0; a < n0; a++) {
    const up0 = a === n0 - 1 ? -(n0 - 1) * s0 : s0;
    const down0 = a === 0 ? (n0 - 1) * s0 : -s0;
    for (let b = 0; b < n1; b++) {
      const up1 = b === n1 - 1 ? -(n1 - 1) * n2 : n2;
      const down1 = b === 0 ? (n1 - 1) * n2 : -n2;
      for (let c = 0; c < n2; c++, i++) {
        const r = rho[i]!;
        const up2 = c === n2 - 1 ? -(n2 - 1) : 1;
        const down2 = c === 0 ? n2 - 1 : -1;
        if (n2 > 1 && (rho[i + up2]! > r || rho[i + down2]! > r)) continue;
        if (n1 > 1 && (rho[i + up1]! > r || rho[i + down1]! > r)) continue;
        if (n0 > 1 && (rho[i + up0]! > r || rho[i + down0]! > r)) continue;
        out.push(i);
      }
    }
  }
  return Int32Array.from(out);
}

/** The densest cell (the first of equals): the densest local maximum, without the candidates' pass. */
function densestCell(psi: Float64Array): { cell: number; rho: number } {
  let best = 0;
  let max = -Infinity;
  for (let i = 0; i < psi.length / 2; i++) {
    const r = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
    if (r > max) {
      max = r;
      best = i;
    }
  }
  return { cell: best, rho: max };
}

/** ρ = |ψ|² per cell, in `scratch` (its first n numbers) when given, else in a new array. */
export function densityGrid(psi: Float64Array, n: number, scratch?: Float64Array): Float64Array {
  const rho = scratch && scratch.length >= n ? scratch.subarray(0, n) : new Float64Array(n);
  for (let i = 0; i < n; i++) rho[i] = psi[2 * i]! ** 2 + psi[2 * i + 1]! ** 2;
  return rho;
}

/**
 * The `count` densest local maxima at least `minSeparation` cells apart (indices and densities); `scratch`, if
 * given, is a grid of at least one number per cell it may overwrite. With `tables` (block-tables.ts) whose memory
 * holds ψ and the scratch, ρ and the local maxima are found in WebAssembly (the same cells).
 */
export function densestPoints(grid: Grid, psi: Float64Array, count: number, minSeparation: number, scratch?: Float64Array, tables?: BlockTables): { index: number; coords: number[]; density: number }[] {
  const [, n1, n2] = grid.shape;
  const cell = (i: number) => [Math.floor(i / (n1 * n2)), Math.floor(i / n2) % n1, i % n2];
  const coordsOf = (ci: number[]) => [grid.coordinate(0, ci[0]!), grid.coordinate(1, ci[1]!), grid.coordinate(2, ci[2]!)].slice(3 - grid.dims);
  if (count === 1) {
    // the first local maximum taken is the densest cell, which no neighbour exceeds
    const top = densestCell(psi);
    return [{ index: top.cell, coords: coordsOf(cell(top.cell)), density: top.rho }];
  }
  const n = grid.size;
  const room = tables?.sums;
  const wasm = tables && scratch && scratch.length >= n && [psi, scratch].every((a) => a.buffer === room!.buffer) && 2 * room!.length > grid.shape[2] + 1;
  const rho = wasm ? scratch.subarray(0, n) : densityGrid(psi, n, scratch);
  if (wasm) tables.kernels.densityCells(psi, rho);
  const heap = new PeakHeap(rho, wasm ? tables.kernels.peakCandidates(rho, grid.shape, room!) : peakCandidates(grid, rho));
  const chosen: { index: number; coords: number[]; density: number }[] = [];
  for (let i = heap.pop(); i >= 0 && chosen.length < count; i = heap.pop()) {
    const ci = cell(i);
    const far = chosen.every((c) => {
      const cj = cell(c.index);
      let d2 = 0;
      for (let ax = 0; ax < 3; ax++) {
        const m = grid.shape[ax]!;
        let d = Math.abs(ci[ax]! - cj[ax]!);
        d = Math.min(d, m - d);
        d2 += d * d;
      }
      return d2 >= minSeparation * minSeparation;
    });
    if (far) chosen.push({ index: i, coords: coordsOf(ci), density: rho[i]! });
  }
  return chosen;
}

/** Per internal axis: the indices (ascending) whose minimum-image distance from the centre is at most `reach`, and those distances squared. */
function nearIndices(grid: Grid, center: readonly number[], reach: number): { idx: number[]; d2: number[] }[] {
  const pad = 3 - grid.dims;
  return ([0, 1, 2] as const).map((ax) => {
    if (ax < pad) return { idx: [0], d2: [0] };
    const L = grid.lengths[ax - pad]!;
    const idx: number[] = [];
    const d2: number[] = [];
    for (let j = 0; j < grid.shape[ax]; j++) {
      let d = grid.coordinate(ax, j) - center[ax - pad]!;
      d -= L * Math.round(d / L);
      if (Math.abs(d) <= reach) {
        idx.push(j);
        d2.push(d * d);
      }
    }
    return { idx, d2 };
  });
}

/** Spherical (circular in 2D) shell averages of ρ around a centre, minimum-image distances, shells of one cell (the sums in WebAssembly with `tables` of ψ's memory). */
export function radialProfile(grid: Grid, psi: Float64Array, center: readonly number[], rMax: number, tables?: BlockTables): { r: number; density: number; cells: number }[] {
  const h = Math.min(...grid.spacing.slice(3 - grid.dims));
  const bins = Math.max(1, Math.ceil(rMax / h));
  const [, n1, n2] = grid.shape;
  // a cell in bin b < bins has r < (bins − ½) h, so every distance along an axis is below bins·h
  const [A, B, C] = nearIndices(grid, center, bins * h);
  const listed = 2 * (A!.idx.length + B!.idx.length + C!.idx.length);
  const wasm = tables && psi.buffer === tables.sums.buffer && 3 * bins + listed <= tables.sums.length ? tables : undefined;
  const room = wasm ? wasm.sums.subarray(0, 3 * bins + listed).fill(0) : new Float64Array(3 * bins);
  const [sum, rs, cnt] = [room.subarray(0, bins), room.subarray(bins, 2 * bins), room.subarray(2 * bins, 3 * bins)];
  if (wasm) {
    // each axis's list: its indices, then their squared distances
    let at = 3 * bins;
    const lists = [A!, B!, C!].map((l) => {
      const list = room.subarray(at, at + 2 * l.idx.length);
      list.set(l.idx);
      list.set(l.d2, l.idx.length);
      at += list.length;
      return list;
    });
    wasm.kernels.radialCells(psi, grid.shape, lists, h, sum, rs, cnt);
  } else radialSums(psi, n1, n2, [A!, B!, C!], h, sum, rs, cnt);
  const out: { r: number; density: number; cells: number }[] = [];
  for (let i = 0; i < bins; i++) if (cnt[i]! > 0) out.push({ r: rs[i]! / cnt[i]!, density: sum[i]! / cnt[i]!, cells: cnt[i]! });
  return out;
}

/** radialProfile's sums over the cells of the index lists A × B × C: Σρ, Σr and the count per shell of width h. */
function radialSums(psi: Float64Array, n1: number, n2: number, [A, B, C]: { idx: number[]; d2: number[] }[], h: number, sum: Float64Array, rs: Float64Array, cnt: Float64Array): void {
  const bins = sum.length;
  for (let ia = 0; ia < A!.idx.length; ia++)
    for (let ib = 0; ib < B!.idx.length; ib++) {
      const row = (A!.idx[ia]! * n1 + B!.idx[ib]!) * n2;
      const dab = A!.d2[ia]! + B!.d2[ib]!;
      for (let ic = 0; ic < C!.idx.length; ic++) {
        const r = Math.sqrt(dab + C!.d2[ic]!);
        const bin = Math.floor(r / h + 0.5);
        if (bin >= bins) continue;
        const p = row + C!.idx[ic]!;
        sum[bin] = sum[bin]! + psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2;
        rs[bin] = rs[bin]! + r;
        cnt[bin] = cnt[bin]! + 1;
      }
    }
}
