/**
 * A cosmological Gaussian random field on the grid, with the linear growing
 * mode's flow in its phase:
 *   δ_k = W_k √(N P(k, a) / V),  P(k, a) = P(k) D(a)²/D(1)²
 * where W_k is the transform of unit white noise drawn cell by cell from a
 * seeded generator (so the field is real and Hermitian symmetry holds by
 * construction, and the same seed gives the same field on any machine), and
 *   S_k = (a² H f / k²) δ_k   (code units, ħ/m = 1)
 * so that v = ∇S/a is the linear velocity (continuity: δ̇ = −∇²S/a²). Both real
 * fields come out of one inverse transform of δ_k + i S_k. "Fixed" modes set
 * |W_k| to its mean; "paired" flips the sign of every mode.
 *
 * In 1D and 2D the box holds the modes of a 3D box of side L (the first side)
 * whose wave vectors along the missing axes are zero: the field is the 3D
 * field averaged along the missing axes over the depth L, so each mode keeps
 * the variance P(k)/L³ it has in the 3D box.
 */
import type { Grid } from "../grid/grid.js";
import { ComplexFft } from "../fields/fft.js";
import { SeededRandom } from "../math/random.js";
import type { LinearPower } from "../physics/cosmology/power.js";

/** How to draw the field. */
export interface RandomFieldOptions {
  readonly seed: number;
  readonly fixedAmplitude: boolean;
  readonly paired: boolean;
  /** D(a)/D(1) at the start. */
  readonly growthRatio: number;
  /** a² H f at the start [code units]: the flow factor of S_k. */
  readonly flowFactor: number;
  /** The code length unit in Mpc. */
  readonly lengthUnitMpc: number;
}

/** δ and the phase S on the grid, interleaved (δ, S) per cell in one array of 2N. */
export class RandomField {
  readonly values: Float64Array;
  constructor(values: Float64Array) {
    this.values = values;
  }
  /** δ per cell (a copy). */
  get delta(): Float64Array {
    return Float64Array.from({ length: this.values.length / 2 }, (_, i) => this.values[2 * i]!);
  }
  /** S per cell (a copy). */
  get phase(): Float64Array {
    return Float64Array.from({ length: this.values.length / 2 }, (_, i) => this.values[2 * i + 1]!);
  }
}

/** Draw δ and S for a spectrum (into `into`, 2N values, when given). */
export function gaussianRandomField(grid: Grid, power: LinearPower, opts: RandomFieldOptions, into?: Float64Array): RandomField {
  const n = grid.size;
  const data = into ? into.fill(0) : new Float64Array(2 * n);
  const rng = new SeededRandom(opts.seed);
  for (let i = 0; i < n; i++) data[2 * i] = rng.normal();
  const fft = new ComplexFft(grid.shape);
  fft.forward(data);
  const volumeMpc3 = grid.volume * opts.lengthUnitMpc ** 3;
  const sign = opts.paired ? -1 : 1;
  grid.forEachMode((p, kx, ky, kz) => {
    const kk = kx * kx + ky * ky + kz * kz;
    if (kk === 0) {
      data[p] = 0;
      data[p + 1] = 0;
      return;
    }
    const kMpc = Math.sqrt(kk) / opts.lengthUnitMpc;
    let amp = sign * opts.growthRatio * Math.sqrt((n * power.at(kMpc)) / volumeMpc3);
    if (opts.fixedAmplitude) amp *= Math.sqrt(n) / Math.hypot(data[p]!, data[p + 1]!);
    const re = data[p]! * amp;
    const im = data[p + 1]! * amp;
    // δ_k + i S_k with S_k = (flow/k²) δ_k
    const f = opts.flowFactor / kk;
    data[p] = re - f * im;
    data[p + 1] = im + f * re;
  });
  fft.inverse(data);
  return new RandomField(data);
}

/** A table of the spectrum used: k, P at z = 0 and at the start, in h and plain units (CSV text). */
export function powerTable(power: LinearPower, grid: Grid, lengthUnitMpc: number, growthRatio: number): string {
  const h = power.params.littleH;
  const table = power.params.table;
  // a user's table is listed only over its own range (psibox does not extrapolate it)
  const kMin = Math.max((2 * Math.PI) / (Math.max(...grid.lengths) * lengthUnitMpc) / 2, table ? table.k[0]! : 0);
  const kMax = Math.min((Math.sqrt(grid.kSquaredMax) / lengthUnitMpc) * 2, table ? table.k[table.k.length - 1]! : Infinity);
  const rows = ["k_h_per_Mpc,k_per_Mpc,P_z0_Mpc3_per_h3,P_start_Mpc3_per_h3,P_z0_Mpc3,P_start_Mpc3,transfer"];
  const count = 200;
  for (let i = 0; i < count; i++) {
    const k = kMin * Math.pow(kMax / kMin, i / (count - 1));
    const p0 = power.at(k);
    const ps = p0 * growthRatio * growthRatio;
    rows.push([k / h, k, p0 * h ** 3, ps * h ** 3, p0, ps, power.transfer(k)].map((v) => v.toPrecision(8)).join(","));
  }
  return rows.join("\n") + "\n";
}
