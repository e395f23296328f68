/**
 * Multi-dimensional FFTs on flat interleaved arrays, built from fft.js 1-D
 * radix-4 transforms. Plans and scratch buffers are created once per shape;
 * transforms are in place and allocate nothing.
 *
 * Conventions: forward F_k = Σ_x f_x e^{−i k·x}; inverse includes 1/N.
 * Complex data are interleaved (re, im) in a Float64Array of length 2N, in
 * the grid's row-major order. Axes of size 1 are skipped.
 */
import FFT from "fft.js";
import type { Triple } from "../grid/grid.js";
import { BLOCK } from "./wasm/layout.js";

/** How many independent units a pass along `axis` splits into (rows for the last axis, outer slabs otherwise). */
export function outerCount(shape: Triple, axis: number): number {
  const [n0, n1, n2] = shape;
  const blocks = Math.ceil(n2 / BLOCK);
  return axis === 2 ? n0 * n1 : (axis === 1 ? n0 : n1) * blocks;
}

/** Pencils transformed together along a strided axis (cache blocking): the wasm kernels' block, so both backends count the same units. */
export const PENCIL_BLOCK = BLOCK;

/** One fft.js plan with pencil buffers for a block of pencils. */
export class Plan1D {
  readonly n: number;
  readonly fft: FFT;
  readonly input: Float64Array;
  readonly output: Float64Array;
  /** BLOCK gathered pencils (views into one buffer), and their transforms. */
  readonly blockIn: Float64Array[];
  readonly blockOut: Float64Array[];
  constructor(n: number) {
    this.n = n;
    this.fft = new FFT(n);
    this.input = new Float64Array(2 * n);
    this.output = new Float64Array(2 * n);
    const bin = new Float64Array(2 * n * BLOCK);
    const bout = new Float64Array(2 * n * BLOCK);
    this.blockIn = Array.from({ length: BLOCK }, (_, b) => bin.subarray(2 * n * b, 2 * n * (b + 1)));
    this.blockOut = Array.from({ length: BLOCK }, (_, b) => bout.subarray(2 * n * b, 2 * n * (b + 1)));
  }
}

/**
 * Transform every pencil of a complex 3D array along one axis. Along the
 * contiguous last axis each pencil is copied in and out; along a strided
 * axis up to 16 neighbouring pencils are gathered at once, so every memory
 * row read brings 16 useful values instead of one.
 * @param data interleaved complex data of shape `shape`
 * @param axis 0, 1 or 2
 */
export function transformAxis(data: Float64Array, shape: Triple, axis: number, plan: Plan1D, inverse: boolean, lo = 0, hi = outerCount(shape, axis)): void {
  const [, n1, n2] = shape;
  const n = plan.n;
  const inBuf = plan.input;
  const outBuf = plan.output;
  const fft = plan.fft;
  if (axis === 2) {
    for (let row = lo; row < hi; row++) {
      const base = 2 * row * n2;
      for (let j = 0; j < 2 * n; j++) inBuf[j] = data[base + j] as number;
      if (inverse) fft.inverseTransform(outBuf, inBuf);
      else fft.transform(outBuf, inBuf);
      for (let j = 0; j < 2 * n; j++) data[base + j] = outBuf[j] as number;
    }
    return;
  }
  const stride = axis === 1 ? n2 : n1 * n2;
  // pencil starts: (a, ·, c) for axis 1, (·, b, c) for axis 0; c is contiguous in memory
  const outerStride = axis === 1 ? n1 * n2 : n2;
  const bin = plan.blockIn;
  const bout = plan.blockOut;
  const blocks = Math.ceil(n2 / BLOCK);
  for (let unit = lo; unit < hi; unit++) {
    const o = Math.floor(unit / blocks);
    const c0 = (unit - o * blocks) * BLOCK;
    {
      const count = Math.min(BLOCK, n2 - c0);
      const start = o * outerStride + c0;
      for (let j = 0; j < n; j++) {
        const p = 2 * (start + j * stride);
        for (let b = 0; b < count; b++) {
          const d = bin[b] as Float64Array;
          d[2 * j] = data[p + 2 * b] as number;
          d[2 * j + 1] = data[p + 2 * b + 1] as number;
        }
      }
      for (let b = 0; b < count; b++) {
        if (inverse) fft.inverseTransform(bout[b], bin[b]);
        else fft.transform(bout[b], bin[b]);
      }
      for (let j = 0; j < n; j++) {
        const p = 2 * (start + j * stride);
        for (let b = 0; b < count; b++) {
          const d = bout[b] as Float64Array;
          data[p + 2 * b] = d[2 * j] as number;
          data[p + 2 * b + 1] = d[2 * j + 1] as number;
        }
      }
    }
  }
}

/** In-place complex FFT over a 3D shape (axes of size 1 skipped). */
export class ComplexFft {
  readonly shape: Triple;
  readonly plans: (Plan1D | undefined)[];

  constructor(shape: Triple) {
    this.shape = shape;
    this.plans = shape.map((n) => (n > 1 ? new Plan1D(n) : undefined));
  }

  /** Forward transform in place. */
  forward(data: Float64Array): void {
    for (let axis = 2; axis >= 0; axis--) {
      const plan = this.plans[axis];
      if (plan) transformAxis(data, this.shape, axis, plan, false);
    }
  }

  /** One pass along `axis` over units [lo, hi) of outerCount(shape, axis). */
  pass(data: Float64Array, axis: number, inverse: boolean, lo: number, hi: number): void {
    const plan = this.plans[axis];
    if (plan) transformAxis(data, this.shape, axis, plan, inverse, lo, hi);
  }

  /** Inverse transform in place (normalised by 1/N). */
  inverse(data: Float64Array): void {
    for (let axis = 0; axis < 3; axis++) {
      const plan = this.plans[axis];
      if (plan) transformAxis(data, this.shape, axis, plan, true);
    }
  }
}

/**
 * Real-to-complex FFT over a 3D shape whose last axis has at least 4 cells.
 * The half spectrum has shape [n0, n1, n2/2 + 1]. The last axis uses the
 * classic packing of a length-n real sequence into a length-n/2 complex one
 * (even samples real, odd samples imaginary) and an O(n) twiddle pass.
 */
export class RealFft {
  readonly shape: Triple;
  /** Shape of the half spectrum. */
  readonly halfShape: Triple;
  private readonly rowPlan: Plan1D;
  /** Plans of the two outer axes of the half spectrum. */
  readonly outerPlans: (Plan1D | undefined)[];
  private readonly cosTw: Float64Array;
  private readonly sinTw: Float64Array;

  constructor(shape: Triple) {
    const [n0, n1, n2] = shape;
    if (n2 < 4) throw new RangeError(`real FFT needs at least 4 cells on the last axis, got ${n2}`);
    this.shape = shape;
    this.halfShape = [n0, n1, n2 / 2 + 1];
    this.rowPlan = new Plan1D(n2 / 2);
    this.outerPlans = [n0 > 1 ? new Plan1D(n0) : undefined, n1 > 1 ? new Plan1D(n1) : undefined];
    const m = n2 / 2;
    this.cosTw = new Float64Array(m + 1);
    this.sinTw = new Float64Array(m + 1);
    for (let k = 0; k <= m; k++) {
      this.cosTw[k] = Math.cos((2 * Math.PI * k) / n2);
      this.sinTw[k] = Math.sin((2 * Math.PI * k) / n2);
    }
  }

  /** Length of the interleaved half-spectrum array. */
  get halfLength(): number {
    return 2 * this.halfShape[0] * this.halfShape[1] * this.halfShape[2];
  }

  /** Forward transform of real `input` into the half spectrum `out` (interleaved). */
  forward(input: Float64Array, out: Float64Array): void {
    this.forwardRows(input, out, 0, this.shape[0] * this.shape[1]);
    this.outer(out, false);
  }

  /** The last-axis real transforms of rows [lo, hi) (the first half of forward()). */
  forwardRows(input: Float64Array, out: Float64Array, lo: number, hi: number): void {
    const [, , n2] = this.shape;
    const h2 = this.halfShape[2];
    const m = n2 / 2;
    const { input: z, output: Z, fft } = this.rowPlan;
    const c = this.cosTw;
    const s = this.sinTw;
    for (let row = lo; row < hi; row++) {
      const src = row * n2;
      for (let j = 0; j < 2 * m; j++) z[j] = input[src + j] as number;
      fft.transform(Z, z);
      const dst = 2 * row * h2;
      for (let k = 0; k <= m; k++) {
        const kk = k === m ? 0 : k;
        const mk = k === 0 ? 0 : m - k;
        const zr = Z[2 * kk] as number;
        const zi = Z[2 * kk + 1] as number;
        const wr = Z[2 * mk] as number;
        const wi = -(Z[2 * mk + 1] as number);
        // E = (Z_k + conj Z_{m−k})/2, O = (Z_k − conj Z_{m−k})/(2i), X = E + e^{−2πik/n} O
        const er = 0.5 * (zr + wr);
        const ei = 0.5 * (zi + wi);
        const or = 0.5 * (zi - wi);
        const oi = -0.5 * (zr - wr);
        const cr = c[k] as number;
        const si = -(s[k] as number);
        out[dst + 2 * k] = er + cr * or - si * oi;
        out[dst + 2 * k + 1] = ei + cr * oi + si * or;
      }
    }
  }

  /** Inverse transform of the half spectrum `spec` into real `out`; `spec` is overwritten. */
  inverse(spec: Float64Array, out: Float64Array): void {
    this.outer(spec, true);
    this.inverseRows(spec, out, 0, this.shape[0] * this.shape[1]);
  }

  /** The last-axis inverse real transforms of rows [lo, hi) (the second half of inverse()). */
  inverseRows(spec: Float64Array, out: Float64Array, lo: number, hi: number): void {
    const [, , n2] = this.shape;
    const h2 = this.halfShape[2];
    const m = n2 / 2;
    const { input: Z, output: z, fft } = this.rowPlan;
    const c = this.cosTw;
    const s = this.sinTw;
    for (let row = lo; row < hi; row++) {
      const src = 2 * row * h2;
      for (let k = 0; k < m; k++) {
        const xr = spec[src + 2 * k] as number;
        const xi = spec[src + 2 * k + 1] as number;
        const yr = spec[src + 2 * (m - k)] as number;
        const yi = -(spec[src + 2 * (m - k) + 1] as number);
        // E = (X_k + conj X_{m−k})/2, O = (X_k − conj X_{m−k}) e^{+2πik/n}/2, Z = E + iO
        const er = 0.5 * (xr + yr);
        const ei = 0.5 * (xi + yi);
        const dr = 0.5 * (xr - yr);
        const di = 0.5 * (xi - yi);
        const cr = c[k] as number;
        const si = s[k] as number;
        const or = dr * cr - di * si;
        const oi = dr * si + di * cr;
        Z[2 * k] = er - oi;
        Z[2 * k + 1] = ei + or;
      }
      fft.inverseTransform(z, Z);
      const dst = row * n2;
      for (let j = 0; j < 2 * m; j++) out[dst + j] = z[j] as number;
    }
  }

  /** One pass of the half spectrum along outer `axis` (0 or 1) over units [lo, hi) of outerCount(halfShape, axis). */
  outerPass(spec: Float64Array, axis: 0 | 1, inverse: boolean, lo: number, hi: number): void {
    const plan = this.outerPlans[axis];
    if (plan) transformAxis(spec, this.halfShape, axis, plan, inverse, lo, hi);
  }

  private outer(spec: Float64Array, inverse: boolean): void {
    const plan0 = this.outerPlans[0];
    const plan1 = this.outerPlans[1];
    if (inverse) {
      if (plan0) transformAxis(spec, this.halfShape, 0, plan0, true);
      if (plan1) transformAxis(spec, this.halfShape, 1, plan1, true);
    } else {
      if (plan1) transformAxis(spec, this.halfShape, 1, plan1, false);
      if (plan0) transformAxis(spec, this.halfShape, 0, plan0, false);
    }
  }
}
