/**
 * Halos followed from snapshot to snapshot. Each halo's main progenitor is
 * the halo of the previous snapshot that gives it the most mass:
 *
 * - by position: the previous halo's centre is carried forward by its own
 *   bulk velocity, x + v ∫dt/a (comoving; peculiar v), and only halos whose
 *   spheres then overlap the new one's (|x_new − x_pred| < R_prev + R_new,
 *   nearest periodic image) are candidates;
 * - by overlapping mass: the mass of the new field inside both spheres (the
 *   soft-edged balls of the catalogue, weights multiplied), so a progenitor
 *   that lands on the new halo's centre counts for more than one that grazes
 *   its edge.
 *
 * Pairs are taken by overlapping mass, largest first, each halo at most once
 * on either side: the new halo continues the progenitor's track; a new halo
 * with no progenitor starts a track; a progenitor left over (merged into a
 * larger one, or dissolved) ends its track. Track ids count from 1 in the
 * order the tracks start (densest first within a snapshot).
 */
import type { Grid } from "../grid/grid.js";
import { ballEdge, forEachInBall, internalPoint, minimumImageDistance, type Halo } from "./halo-catalogue.js";

/** What tracking keeps of a halo: where it is, its size and its motion (code units, comoving). */
export interface TrackedHalo {
  readonly centre: readonly number[];
  readonly radius: number;
  readonly velocity: readonly number[];
}

/** The offset b − a by the nearest periodic image, internal 3D coordinates. */
function nearestOffset(grid: Grid, a: readonly number[], b: readonly number[]): number[] {
  return [0, 1, 2].map((ax) => {
    if (grid.shape[ax]! === 1) return 0;
    const L = grid.extent[ax]!;
    const d = b[ax]! - a[ax]!;
    return d - L * Math.round(d / L);
  });
}

/**
 * The mass of ψ inside both soft-edged balls: radius `r1` about `c1` and `r2` about `c2` (one coordinate per
 * simulated axis, periodic; code units).
 */
export function overlapMass(grid: Grid, psi: Float64Array, c1: readonly number[], r1: number, c2: readonly number[], r2: number): number {
  const off = nearestOffset(grid, internalPoint(grid, c1), internalPoint(grid, c2));
  const h = ballEdge(grid);
  let m = 0;
  forEachInBall(grid, c1, r1, (p, w, d) => {
    const w2 = Math.min(1, Math.max(0, (r2 - Math.hypot(d[0] - off[0]!, d[1] - off[1]!, d[2] - off[2]!)) / h + 0.5));
    if (w2 > 0) m += w * w2 * (psi[2 * p]! ** 2 + psi[2 * p + 1]! ** 2);
  });
  return m * grid.cellVolume;
}

/** A centre moved by a displacement (code lengths per simulated axis) and wrapped into the box. */
function moved(grid: Grid, centre: readonly number[], shift: readonly number[]): number[] {
  return centre.map((x, k) => {
    const L = grid.lengths[k]!;
    const y = (x + shift[k]!) % L;
    return y < 0 ? y + L : y;
  });
}

/**
 * The main progenitor of each new halo among the previous snapshot's halos (its index, or -1 when it has none).
 * @param drift ∫dt/a from the previous snapshot to this one (code units): the previous centres move by v·drift
 */
export function mainProgenitors(grid: Grid, psi: Float64Array, previous: readonly TrackedHalo[], current: readonly TrackedHalo[], drift: number): number[] {
  const predicted = previous.map((h) => moved(grid, h.centre, h.velocity.map((v) => v * drift)));
  const pairs: { i: number; j: number; mass: number; distance: number }[] = [];
  previous.forEach((prev, i) => {
    current.forEach((cur, j) => {
      const distance = minimumImageDistance(grid, internalPoint(grid, predicted[i]!), internalPoint(grid, cur.centre));
      if (distance >= prev.radius + cur.radius) return;
      const mass = overlapMass(grid, psi, cur.centre, cur.radius, predicted[i]!, prev.radius);
      if (mass > 0) pairs.push({ i, j, mass, distance });
    });
  });
  pairs.sort((x, y) => y.mass - x.mass || x.distance - y.distance);
  const progenitor = current.map(() => -1);
  const taken = new Set<number>();
  for (const { i, j } of pairs) {
    if (taken.has(i) || progenitor[j]! >= 0) continue;
    progenitor[j] = i;
    taken.add(i);
  }
  return progenitor;
}

/** Gives the halos of successive snapshots their track ids. */
export class HaloTracker {
  private previous: (TrackedHalo & { readonly track: number })[] = [];
  private next = 1;

  /** Track ids of the halos of the next snapshot (in its order); `drift` = ∫dt/a since the previous snapshot (code units). */
  assign(grid: Grid, psi: Float64Array, halos: readonly Halo[], drift: number): number[] {
    const progenitors = mainProgenitors(grid, psi, this.previous, halos, drift);
    const ids = progenitors.map((i) => (i >= 0 ? this.previous[i]!.track : this.next++));
    this.previous = halos.map((h, j) => ({ centre: h.centre, radius: h.radius, velocity: h.velocity, track: ids[j]! }));
    return ids;
  }
}
