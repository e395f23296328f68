/**
 * A 1D run's space–time diagram: log density against position (across)
 * and time (up). Each snapshot is drawn as a band of constant density
 * centred on its time and half a typical snapshot interval wide on each
 * side; nothing is interpolated between snapshots, and times no snapshot
 * covers (a missing snapshot, an uneven cadence) stay grey.
 */
import { colourRange, fieldFigure } from "./field-image.js";
import type { ColourMap } from "./colormaps.js";
import type { Figure } from "./render.js";
import { formatNumber } from "../core/format.js";

export interface SpacetimeRow {
  readonly t: number;
  /** log₁₀ ρ per cell. */
  readonly logRho: Float64Array;
}

/** Rows of the raster: for each, the snapshot it shows, or −1 for a gap. */
export function bandRows(times: readonly number[], rows: number): Int32Array {
  const out = new Int32Array(rows).fill(-1);
  const t0 = times[0]!;
  const span = times.at(-1)! - t0;
  if (times.length < 2 || !(span > 0)) return out.fill(0);
  const gaps = times.slice(1).map((t, i) => t - times[i]!).sort((a, b) => a - b);
  const half = 0.5 * gaps[Math.floor((gaps.length - 1) / 2)]!;
  for (let r = 0; r < rows; r++) {
    const t = t0 + ((r + 0.5) / rows) * span;
    let best = -1;
    let dist = Infinity;
    times.forEach((ti, i) => {
      const d = Math.abs(t - ti);
      if (d <= half * (1 + 1e-9) && d < dist) {
        best = i;
        dist = d;
      }
    });
    out[r] = best;
  }
  return out;
}

/** Draw the diagram; `boxKpc` is the box side, `timeUnit` the unit of the times. */
export async function spacetimeFigure(rows: readonly SpacetimeRow[], boxKpc: number, timeUnit: string, opts: { colourMap: ColourMap; decades: number; range?: readonly [number, number] }): Promise<Figure> {
  const n = rows[0]!.logRho.length;
  const raster = 400;
  const bands = bandRows(rows.map((r) => r.t), raster);
  const values = new Float64Array(n * raster);
  for (let r = 0; r < raster; r++) for (let i = 0; i < n; i++) values[r * n + i] = bands[r]! < 0 ? NaN : rows[bands[r]!]!.logRho[i]!;
  const range = colourRange(values, opts.decades, opts.range);
  const gaps = bands.some((b) => b < 0);
  const dx = boxKpc / n;
  const t0 = rows[0]!.t;
  const t1 = rows.at(-1)!.t;
  return fieldFigure(
    { nx: n, ny: raster, values, x0: -0.5 * dx, y0: t0, width: boxKpc, height: t1 > t0 ? t1 - t0 : 1 },
    {
      xTitle: "x [kpc]",
      yTitle: `t [${timeUnit}]`,
      legend: "log₁₀ ρ [Msun/kpc³]",
      title: `Space–time density, ${rows.length} snapshots`,
      subtitle: `one band per snapshot, not interpolated${gaps ? "; grey: no snapshot" : ""}; ${opts.range ? "fixed colours" : `colours span ≤ ${formatNumber(opts.decades)} decades`}`,
      range,
      colourMap: opts.colourMap,
      size: 380,
      aspect: 0.62,
    },
  );
}
