// The split-step's transform kernels in WebAssembly with 128-bit SIMD, written
// in AssemblyScript and compiled by `npm run build` to dist/fields/wasm/kernels.wasm.
//
// Every field lives in one shared linear memory that JavaScript allocates
// (fields/step-memory.ts lays it out); functions take byte addresses and sizes. A v128
// holds one complex double (re, im). Along every axis a pass gathers up to
// BLOCK pencils into a scratch block, point-major ([point][pencil]), in
// bit-reversed point order; runs radix-4 decimation-in-time butterflies
// (one radix-2 stage first when log2 n is odd) on all pencils at once, each
// twiddle loaded once per butterfly and used for every pencil; and scatters
// the result back. Pencils never mix, so a pencil's arithmetic does not
// depend on how many share its block: results are the same for any thread
// count or block split.
//
// Twiddle tables (built in JavaScript): for each radix-4 stage of quarter
// length h, for k < h, six v128: (w^k re, w^k re), (−w^k im, w^k im), the same
// for w^2k and w^3k, with w = e^{∓2πi/4h} (forward: minus).
//
// Conventions as fields/fft.ts: forward F_k = Σ f_x e^{−ikx}; the inverse is
// scaled by the `scale` its caller passes (1/n for a normalised inverse).

import { BLOCK, CONSTANTS_ADDRESS, RESERVED_BYTES, TWIDDLE_STRIDE } from "./layout";

// The shared numbers as this module was built with them: fields/wasm-kernels.ts
// compares them with its own on load.
export const LAYOUT_BLOCK: i32 = BLOCK;
export const LAYOUT_CONSTANTS_ADDRESS: i32 = CONSTANTS_ADDRESS;
export const LAYOUT_RESERVED_BYTES: i32 = RESERVED_BYTES;
export const LAYOUT_TWIDDLE_STRIDE: i32 = TWIDDLE_STRIDE;

@inline function cmul(x: v128, wr: v128, wi: v128): v128 {
  return f64x2.add(f64x2.mul(x, wr), f64x2.mul(v128.shuffle<f64>(x, x, 1, 0), wi));
}

@inline function swap(x: v128): v128 {
  return v128.shuffle<f64>(x, x, 1, 0);
}

// A transform of a block runs as: the first stage (twiddle-free: radix-2
// when log2 n is odd, radix-4 with w = 1 otherwise), fused with the gather
// that puts points in bit-reversed order; the radix-4 stages of quarter
// lengths h = 2 or 4, then ×4 …; the last one (h = n/4) fused with the
// scatter that writes the result (times `scale`) back. Butterflies with k = 0
// skip their twiddle multiplications.

/** Quarter length h of the first twiddled radix-4 stage, after the first stage. */
@inline function firstTwiddledH(n: i32): i32 {
  return ctz<i32>(n) & 1 ? (n >= 8 ? 8 : 2) : 4;
}

/** Address of the twiddles of the first twiddled stage (an even log2 n skips the h = 1 stage's entry). */
@inline function firstTwiddles(n: i32, tw: usize): usize {
  return ctz<i32>(n) & 1 ? (n >= 8 ? tw + <usize>(2 * TWIDDLE_STRIDE) : tw) : tw + <usize>TWIDDLE_STRIDE;
}

/**
 * The twiddle-free radix-4 butterfly of four rows (natural residues 0, 2, 1, 3 in x0…x3), results to q0…q3,
 * times `sc` when `scaled` (a constant at each call, so unscaled stages carry no multiplication by 1).
 * ×(∓i) is a swap and the sign mask `rot` flipping one lane: the same bits as multiplying by (±1, ∓1).
 */
@inline function plainRadix4(x0: v128, x1: v128, x2: v128, x3: v128, rot: v128, q0: usize, q1: usize, q2: usize, q3: usize, sc: v128, scaled: bool): void {
  const u0 = f64x2.add(x0, x1);
  const u1 = f64x2.sub(x0, x1);
  const v0 = f64x2.add(x2, x3);
  const v1 = v128.xor(swap(f64x2.sub(x2, x3)), rot);
  if (scaled) {
    v128.store(q0, f64x2.mul(f64x2.add(u0, v0), sc));
    v128.store(q2, f64x2.mul(f64x2.sub(u0, v0), sc));
    v128.store(q1, f64x2.mul(f64x2.add(u1, v1), sc));
    v128.store(q3, f64x2.mul(f64x2.sub(u1, v1), sc));
  } else {
    v128.store(q0, f64x2.add(u0, v0));
    v128.store(q2, f64x2.sub(u0, v0));
    v128.store(q1, f64x2.add(u1, v1));
    v128.store(q3, f64x2.sub(u1, v1));
  }
}

/**
 * Gather `count` pencils (point j of pencil b at src + j·pointStride + b·pencilStride)
 * into buf in bit-reversed point order, doing the first stage on the way.
 */
function gatherFirst(src: usize, pointStride: i32, pencilStride: i32, n: i32, count: i32, buf: usize, pitch: i32, rev: usize, rot: v128, tw: usize): void {
  const one = f64x2.splat(1.0);
  if (ctz<i32>(n) & 1 && n >= 8) {
    firstTwoStages(src, pointStride, pencilStride, n, count, buf, pitch, rev, rot, tw);
    return;
  }
  if (ctz<i32>(n) & 1) {
    for (let t: i32 = 0; t < n; t += 2) {
      const s0 = src + <usize>(load<i32>(rev + (<usize>t << 2)) * pointStride);
      const s1 = s0 + <usize>((n >> 1) * pointStride);
      const d0 = buf + <usize>(t * pitch);
      const d1 = d0 + <usize>pitch;
      for (let b: i32 = 0; b < count; b++) {
        const x = v128.load(s0 + <usize>(b * pencilStride));
        const y = v128.load(s1 + <usize>(b * pencilStride));
        v128.store(d0 + (<usize>b << 4), f64x2.add(x, y));
        v128.store(d1 + (<usize>b << 4), f64x2.sub(x, y));
      }
    }
    return;
  }
  const quarter = <usize>((n >> 2) * pointStride);
  for (let t: i32 = 0; t < n; t += 4) {
    // rows 4t … 4t+3 hold points r, r + n/2, r + n/4, r + 3n/4 with r = rev[4t]
    const s0 = src + <usize>(load<i32>(rev + (<usize>t << 2)) * pointStride);
    const s2 = s0 + quarter;
    const s1 = s2 + quarter;
    const s3 = s1 + quarter;
    const d0 = buf + <usize>(t * pitch);
    const d1 = d0 + <usize>pitch;
    const d2 = d1 + <usize>pitch;
    const d3 = d2 + <usize>pitch;
    for (let b: i32 = 0; b < count; b++) {
      const o = <usize>(b * pencilStride);
      const q = <usize>b << 4;
      plainRadix4(v128.load(s0 + o), v128.load(s1 + o), v128.load(s2 + o), v128.load(s3 + o), rot, d0 + q, d1 + q, d2 + q, d3 + q, one, false);
    }
  }
}

/** The first stage in place, for data already in bit-reversed order in buf. */
function firstStage(buf: usize, n: i32, pitch: i32, count: i32, rot: v128, tw: usize): void {
  const one = f64x2.splat(1.0);
  if (ctz<i32>(n) & 1 && n >= 8) {
    firstTwoStages(buf, 0, 16, n, count, buf, pitch, 0, rot, tw);
    return;
  }
  if (ctz<i32>(n) & 1) {
    for (let t: i32 = 0; t < n; t += 2) {
      const d0 = buf + <usize>(t * pitch);
      const d1 = d0 + <usize>pitch;
      for (let b: i32 = 0; b < count; b++) {
        const q = <usize>b << 4;
        const x = v128.load(d0 + q);
        const y = v128.load(d1 + q);
        v128.store(d0 + q, f64x2.add(x, y));
        v128.store(d1 + q, f64x2.sub(x, y));
      }
    }
    return;
  }
  for (let t: i32 = 0; t < n; t += 4) {
    const d0 = buf + <usize>(t * pitch);
    const d1 = d0 + <usize>pitch;
    const d2 = d1 + <usize>pitch;
    const d3 = d2 + <usize>pitch;
    for (let b: i32 = 0; b < count; b++) {
      const q = <usize>b << 4;
      plainRadix4(v128.load(d0 + q), v128.load(d1 + q), v128.load(d2 + q), v128.load(d3 + q), rot, d0 + q, d1 + q, d2 + q, d3 + q, one, false);
    }
  }
}

/**
 * One radix-4 stage of quarter length h on buf, twiddles at t. Output rows go
 * back to buf, or with `dst` ≠ 0 (the last stage, h = n/4) to point j of each
 * pencil at dst + j·pointStride + b·pencilStride, times `scale` when `scaled`.
 */
@inline function stage(
  buf: usize, n: i32, pitch: i32, count: i32, t: usize, h: i32, rot: v128,
  dst: usize, pointStride: i32, pencilStride: i32, scale: f64, scaled: bool,
): void {
  const q = <usize>(h * pitch);
  const sc = f64x2.splat(scale);
  const toMemory = dst != 0;
  for (let s: i32 = 0; s < n; s += 4 * h) {
    for (let k: i32 = 0; k < h; k++) {
      const p0 = buf + <usize>((s + k) * pitch);
      const p1 = p0 + q;
      const p2 = p1 + q;
      const p3 = p2 + q;
      let o0 = p0;
      let o1 = p1;
      let o2 = p2;
      let o3 = p3;
      let step: usize = 16;
      if (toMemory) {
        o0 = dst + <usize>(k * pointStride);
        o1 = o0 + <usize>(h * pointStride);
        o2 = o1 + <usize>(h * pointStride);
        o3 = o2 + <usize>(h * pointStride);
        step = <usize>pencilStride;
      }
      if (k == 0) {
        for (let b: i32 = 0; b < count; b++) {
          const i = <usize>b << 4;
          const j = <usize>b * step;
          plainRadix4(v128.load(p0 + i), v128.load(p1 + i), v128.load(p2 + i), v128.load(p3 + i), rot, o0 + j, o1 + j, o2 + j, o3 + j, sc, scaled);
        }
        continue;
      }
      const tk = t + <usize>(k * TWIDDLE_STRIDE);
      const w1r = v128.load(tk);
      const w1i = v128.load(tk, 16);
      const w2r = v128.load(tk, 32);
      const w2i = v128.load(tk, 48);
      const w3r = v128.load(tk, 64);
      const w3i = v128.load(tk, 80);
      for (let b: i32 = 0; b < count; b++) {
        const i = <usize>b << 4;
        const j = <usize>b * step;
        // blocks 0…3 hold the DFTs of the residues 0, 2, 1, 3 (mod 4)
        const x0 = v128.load(p0 + i);
        const t2 = cmul(v128.load(p1 + i), w2r, w2i);
        const t1 = cmul(v128.load(p2 + i), w1r, w1i);
        const t3 = cmul(v128.load(p3 + i), w3r, w3i);
        plainRadix4(x0, t2, t1, t3, rot, o0 + j, o1 + j, o2 + j, o3 + j, sc, scaled);
      }
    }
  }
}

@inline function rotation(inverse: bool): v128 {
  // ×(−i) forward, ×(+i) inverse: (re, im) → (±im, ∓re), the swapped pair's sign flipped in lane 0 (inverse) or 1
  return inverse ? f64x2(-0.0, 0.0) : f64x2(0.0, -0.0);
}

/** All stages after the first on buf (result in natural order in buf). */
function stagesInBuf(buf: usize, n: i32, pitch: i32, count: i32, tw: usize, inverse: bool): void {
  const rot = rotation(inverse);
  let t = firstTwiddles(n, tw);
  for (let h = firstTwiddledH(n); h < n; h <<= 2) {
    stage(buf, n, pitch, count, t, h, rot, 0, 0, 0, 1.0, false);
    t += <usize>(h * TWIDDLE_STRIDE);
  }
}

/** All stages after the first, the last one writing to memory (times `scale`). */
function stagesToMemory(buf: usize, n: i32, pitch: i32, count: i32, tw: usize, inverse: bool, dst: usize, pointStride: i32, pencilStride: i32, scale: f64): void {
  const rot = rotation(inverse);
  if (firstTwiddledH(n) >= n) {
    // the first stage (or the fused first two) was the whole transform
    scatter(dst, pointStride, pencilStride, n, count, buf, pitch, scale);
    return;
  }
  let t = firstTwiddles(n, tw);
  let h = firstTwiddledH(n);
  for (; 4 * h < n; h <<= 2) {
    stage(buf, n, pitch, count, t, h, rot, 0, 0, 0, 1.0, false);
    t += <usize>(h * TWIDDLE_STRIDE);
  }
  // a forward transform's scale is 1: its last stage without the multiplications
  if (scale == 1.0) stage(buf, n, pitch, count, t, h, rot, dst, pointStride, pencilStride, scale, false);
  else stage(buf, n, pitch, count, t, h, rot, dst, pointStride, pencilStride, scale, true);
}

/** Transform `count` pencils from memory into buf (natural order). */
function transformToBuf(src: usize, pointStride: i32, pencilStride: i32, n: i32, count: i32, buf: usize, pitch: i32, rev: usize, tw: usize, inverse: bool): void {
  gatherFirst(src, pointStride, pencilStride, n, count, buf, pitch, rev, rotation(inverse), tw);
  stagesInBuf(buf, n, pitch, count, tw, inverse);
}

/** Transform `count` pencils in memory in place (times `scale`). */
function transformInPlace(data: usize, pointStride: i32, pencilStride: i32, n: i32, count: i32, buf: usize, pitch: i32, rev: usize, tw: usize, inverse: bool, scale: f64): void {
  gatherFirst(data, pointStride, pencilStride, n, count, buf, pitch, rev, rotation(inverse), tw);
  stagesToMemory(buf, n, pitch, count, tw, inverse, data, pointStride, pencilStride, scale);
}

/** Transform bit-reversed data in buf and write it to memory (times `scale`). */
function transformBufToMemory(buf: usize, n: i32, pitch: i32, count: i32, tw: usize, inverse: bool, dst: usize, pointStride: i32, pencilStride: i32, scale: f64): void {
  firstStage(buf, n, pitch, count, rotation(inverse), tw);
  stagesToMemory(buf, n, pitch, count, tw, inverse, dst, pointStride, pencilStride, scale);
}

/** Scatter buf (natural point order) back, each value multiplied by `scale`. */
function scatter(dst: usize, pointStride: i32, pencilStride: i32, n: i32, count: i32, buf: usize, pitch: i32, scale: f64): void {
  const sc = f64x2.splat(scale);
  for (let j: i32 = 0; j < n; j++) {
    const d = dst + <usize>(j * pointStride);
    const s = buf + <usize>(j * pitch);
    for (let b: i32 = 0; b < count; b++) v128.store(d + <usize>(b * pencilStride), f64x2.mul(v128.load(s + (<usize>b << 4)), sc));
  }
}

// A pass along `axis` of a complex array of shape (n0, n1, n2) covers units
// [lo, hi): rows (axis 2), or (outer index, block of BLOCK columns) pairs
// (axes 0 and 1), as outerCount() in fields/fft.ts counts them.

/** Rows a long rows pass transforms together: two scratch blocks of them stay in a core's cache. */
const LONG_BLOCK: i32 = 8;

/** Rows from this length on are transformed LONG_BLOCK at a time through rowsCopy. */
const LONG_ROW: i32 = 1024;

/**
 * Rows of n points a rows pass transforms together: LONG_BLOCK from LONG_ROW on, else a scratch block of
 * about 32 KiB (BLOCK rows of up to 128 points, 8 of 256, 4 of 512). Rows a power of two apart fall
 * into few sets of a core's first-level cache; more of them at once thrash it (measured: rows of 256
 * points took 1.9 times as long 16 at a time as 8 at a time, rows of 512 points 2.3 times as long as 4).
 * Rows never mix, so the block size changes no result.
 */
@inline function rowsBlock(n: i32): i32 {
  return n >= LONG_ROW ? LONG_BLOCK : min(BLOCK, max(4, 2048 / n));
}

/**
 * FFT of rows [lo, hi) along the last axis, rowsBlock(n2) rows at a time. With
 * `kickFactor` non-zero the rows are first multiplied by e^{−iK(φ + g|s|²)}
 * (the step's opening kick, while the block is in cache; see `kick`); with `density` set, φ ← |ψ|²
 * of the transformed rows is written afterwards and Σ|ψ|² returned.
 */
export function rowsPass(
  data: usize, n2: i32, lo: i32, hi: i32, buf: usize, tw: usize, rev: usize, inverse: bool, scale: f64,
  phi: usize, kickFactor: f64, density: bool, src: usize, contact: f64,
): f64 {
  let sum = f64x2.splat(0);
  const long = n2 >= LONG_ROW;
  const block = rowsBlock(n2);
  for (let r = lo; r < hi; r += block) {
    const count = min(block, hi - r);
    const p = data + (<usize>(r * n2) << 4);
    if (kickFactor != 0) kick(data, src, phi, kickFactor, contact, r * n2, (r + count) * n2);
    if (long) rowsInPlace(p, n2, count, buf, rev, tw, inverse, scale);
    else transformInPlace(p, 16, n2 << 4, n2, count, buf, count << 4, rev, tw, inverse, scale);
    if (density) sum = f64x2.add(sum, densityCells(p, phi + (<usize>(r * n2) << 3), count * n2));
  }
  return f64x2.extract_lane(sum, 0) + f64x2.extract_lane(sum, 1);
}

/** φ ← |ψ|² over `cells` cells (an even count) from p and q; returns the lane sums of |ψ|². */
@inline function densityCells(p: usize, q: usize, cells: i32): v128 {
  let sum = f64x2.splat(0);
  for (let i: i32 = 0; i < cells; i += 2) {
    const x0 = v128.load(p + (<usize>i << 4));
    const x1 = v128.load(p + (<usize>i << 4), 16);
    const s0 = f64x2.mul(x0, x0);
    const s1 = f64x2.mul(x1, x1);
    // (|ψ_i|², |ψ_i+1|²) from the two squared pairs
    const rho = f64x2.add(v128.shuffle<f64>(s0, s1, 0, 2), v128.shuffle<f64>(s0, s1, 1, 3));
    v128.store(q + (<usize>i << 3), rho);
    sum = f64x2.add(sum, rho);
  }
  return sum;
}

/** φ ← |ψ|² over cells [lo, hi) (an even count, from an even start); returns Σ|ψ|². */
export function density(psi: usize, phi: usize, lo: i32, hi: i32): f64 {
  const sum = densityCells(psi + (<usize>lo << 4), phi + (<usize>lo << 3), hi - lo);
  return f64x2.extract_lane(sum, 0) + f64x2.extract_lane(sum, 1);
}

/** Pencils from this length on go through a fused strided pass (two scratch blocks) LONG_PART at a time. */
const LONG_COLUMN: i32 = 2048;
const LONG_PART: i32 = 8;

// What a strided pass does between its forward and inverse transforms.
const PLAIN: i32 = 0; // one transform only, in place
const DRIFT: i32 = 1;
const POISSON: i32 = 2;

/**
 * A pass along axis 0 or 1 over units [lo, hi): each unit is a block of up
 * to BLOCK neighbouring pencils. PLAIN transforms in place (tw, `inverse`,
 * `scale`); DRIFT and POISSON transform forward (tw), multiply in Fourier
 * space (driftBlock, poissonBlock) and transform back (twI, 1/n). Returns
 * the drift block's kinetic sum.
 */
function stridedPass(
  data: usize, n0: i32, n1: i32, n2: i32, axis: i32, lo: i32, hi: i32, buf: usize, buf2: usize,
  tw: usize, twI: usize, rev: usize, inverse: bool, scale: f64, mode: i32,
  pAxis: usize, pOuter: usize, pLane: usize, kAxis: usize, kOuter: usize, kLane: usize,
): f64 {
  const n = axis == 1 ? n1 : n0;
  const pointStride = (axis == 1 ? n2 : n1 * n2) << 4;
  const outerStride = axis == 1 ? n1 * n2 : n2;
  const blocks = (n2 + BLOCK - 1) / BLOCK;
  // long pencils with two scratch blocks: part of a unit at a time, so that both stay in a core's cache
  const part = mode != PLAIN && n >= LONG_COLUMN ? LONG_PART : BLOCK;
  let sum = f64x2.splat(0);
  for (let u = lo; u < hi; u++) {
    const o = u / blocks;
    const u0 = (u - o * blocks) * BLOCK;
    const end = min(u0 + BLOCK, n2);
    for (let c0 = u0; c0 < end; c0 += part) {
      const count = min(part, end - c0);
      const pitch = count << 4;
      const p = data + (<usize>(o * outerStride + c0) << 4);
      if (mode == PLAIN) {
        transformInPlace(p, pointStride, 16, n, count, buf, pitch, rev, tw, inverse, scale);
        continue;
      }
      transformToBuf(p, pointStride, 16, n, count, buf, pitch, rev, tw, false);
      if (mode == DRIFT) sum = driftBlock(buf, buf2, n, count, pitch, o, c0, rev, pAxis, pOuter, pLane, kAxis, kOuter, kLane, sum);
      else poissonBlock(buf, buf2, n, count, pitch, o, c0, rev, kAxis, kOuter, kLane);
      transformBufToMemory(buf2, n, pitch, count, twI, true, p, pointStride, 16, 1.0 / <f64>n);
    }
  }
  return f64x2.extract_lane(sum, 0) + f64x2.extract_lane(sum, 1);
}

/**
 * The drift's phase on a transformed block (pencils c0 … c0+count−1 of outer
 * index o), written to buf2 in bit-reversed order for the inverse; with kAxis
 * non-zero, adds Σ k²|ψ_k|² of the block to `sum` first.
 */
@inline function driftBlock(
  buf: usize, buf2: usize, n: i32, count: i32, pitch: i32, o: i32, c0: i32, rev: usize,
  pAxis: usize, pOuter: usize, pLane: usize, kAxis: usize, kOuter: usize, kLane: usize, sum: v128,
): v128 {
  if (kAxis != 0) {
    const ko = load<f64>(kOuter + (<usize>o << 3));
    for (let j: i32 = 0; j < n; j++) {
      const s = buf + <usize>(j * pitch);
      const kj = load<f64>(kAxis + (<usize>j << 3)) + ko;
      for (let b: i32 = 0; b < count; b++) {
        const x = v128.load(s + (<usize>b << 4));
        const kk = f64x2.splat(kj + load<f64>(kLane + (<usize>(c0 + b) << 3)));
        sum = f64x2.add(sum, f64x2.mul(kk, f64x2.mul(x, x)));
      }
    }
  }
  // e = (pLane[c0 + b] · pOuter[o]) · pAxis[j]
  const po = v128.load(pOuter + (<usize>o << 4));
  const por = v128.shuffle<f64>(po, po, 0, 0);
  const poi = f64x2.mul(v128.shuffle<f64>(po, po, 1, 1), f64x2(-1.0, 1.0));
  for (let j: i32 = 0; j < n; j++) {
    const s = buf + <usize>(j * pitch);
    const d = buf2 + <usize>(load<i32>(rev + (<usize>j << 2)) * pitch);
    const pa = v128.load(pAxis + (<usize>j << 4));
    const par = v128.shuffle<f64>(pa, pa, 0, 0);
    const pai = f64x2.mul(v128.shuffle<f64>(pa, pa, 1, 1), f64x2(-1.0, 1.0));
    for (let b: i32 = 0; b < count; b++) {
      const e = cmul(cmul(v128.load(pLane + (<usize>(c0 + b) << 4)), por, poi), par, pai);
      const x = v128.load(s + (<usize>b << 4));
      const er = v128.shuffle<f64>(e, e, 0, 0);
      const ei = f64x2.mul(v128.shuffle<f64>(e, e, 1, 1), f64x2(-1.0, 1.0));
      v128.store(d + (<usize>b << 4), cmul(x, er, ei));
    }
  }
  return sum;
}

/** spec ← −spec/k² (0 at k = 0) on a transformed block, written to buf2 in bit-reversed order. */
@inline function poissonBlock(buf: usize, buf2: usize, n: i32, count: i32, pitch: i32, o: i32, c0: i32, rev: usize, kAxis: usize, kOuter: usize, kLane: usize): void {
  const ko = load<f64>(kOuter + (<usize>o << 3));
  for (let j: i32 = 0; j < n; j++) {
    const s = buf + <usize>(j * pitch);
    const d = buf2 + <usize>(load<i32>(rev + (<usize>j << 2)) * pitch);
    const kj = load<f64>(kAxis + (<usize>j << 3)) + ko;
    for (let b: i32 = 0; b < count; b++) {
      const kk = kj + load<f64>(kLane + (<usize>(c0 + b) << 3));
      const g = kk > 0 ? -1.0 / kk : 0.0;
      v128.store(d + (<usize>b << 4), f64x2.mul(v128.load(s + (<usize>b << 4)), f64x2.splat(g)));
    }
  }
}

/** One FFT pass along `axis` over units [lo, hi). */
export function axisPass(data: usize, n0: i32, n1: i32, n2: i32, axis: i32, lo: i32, hi: i32, buf: usize, tw: usize, rev: usize, inverse: bool, scale: f64): void {
  if (axis == 2) rowsPass(data, n2, lo, hi, buf, tw, rev, inverse, scale, 0, 0.0, false, 0, 0.0);
  else stridedPass(data, n0, n1, n2, axis, lo, hi, buf, 0, tw, 0, rev, inverse, scale, PLAIN, 0, 0, 0, 0, 0, 0);
}

/**
 * The drift's three middle steps fused for the outermost strided axis (0, or
 * 1 when n0 = 1): forward transform along it, ψ_k ← ψ_k e^{−ik²D/2}, inverse
 * transform, all while the block is in cache. Phase tables hold (cos, sin)
 * per index: `pAxis` along the axis, `pOuter` along the other strided axis
 * (1 for axis 0, 0 for axis 1) and `pLane` along axis 2. With `kAxis`
 * non-zero, returns Σ (kA² + kO² + kL²)|ψ_k|² over the units (the k² tables
 * are laid out as the phase tables, one f64 per index), before the phase.
 */
export function driftOuter(
  data: usize, n0: i32, n1: i32, n2: i32, axis: i32, lo: i32, hi: i32, buf: usize, buf2: usize,
  twF: usize, twI: usize, rev: usize, pAxis: usize, pOuter: usize, pLane: usize, kAxis: usize, kOuter: usize, kLane: usize,
): f64 {
  return stridedPass(data, n0, n1, n2, axis, lo, hi, buf, buf2, twF, twI, rev, false, 1.0, DRIFT, pAxis, pOuter, pLane, kAxis, kOuter, kLane);
}

/**
 * The periodic Poisson solve's middle fused for the outermost strided axis of
 * the half spectrum: forward transform along it, spec ← −spec/k² (0 at
 * k = 0), inverse transform. k² tables as in driftOuter (half-spectrum
 * length along axis 2).
 */
export function poissonOuter(
  data: usize, n0: i32, n1: i32, n2: i32, axis: i32, lo: i32, hi: i32, buf: usize, buf2: usize,
  twF: usize, twI: usize, rev: usize, kAxis: usize, kOuter: usize, kLane: usize,
): void {
  stridedPass(data, n0, n1, n2, axis, lo, hi, buf, buf2, twF, twI, rev, false, 1.0, POISSON, 0, 0, 0, kAxis, kOuter, kLane);
}

// A long 1D grid's transforms in four steps (fields/step-memory.ts LongLayout):
// the columns are a PLAIN strided pass (axisPass on shape (n1, 1, n2)); the
// rows pass below multiplies each row by its twiddles and transforms it, and
// in the drift applies the phase of each stored wavenumber between its
// forward and inverse transforms. The spectrum stays in transposed order:
// row a, column k2 holds wavenumber index a + rows·k2.
const LONG_FORWARD: i32 = 0;
const LONG_INVERSE: i32 = 1;
const LONG_DRIFT: i32 = 2;

/**
 * Rows r … r+count−1 of a block (n2 cells each, from p) into buf point-major
 * ([point][row], `pitch` bytes per point; point j at position rev[j] when
 * `rev` ≠ 0), times their twiddles (table `ltw`, none when 0; see longRows);
 * with `out`, the other way (buf in natural order back to the rows, times
 * `scale` and the conjugate twiddles). Four points (a cache line of a row) of
 * every row at a time, so each line is used whole: gathering a block's
 * points straight from rows a power of two apart thrashes the cache's sets.
 */
function rowsCopy(p: usize, n2: i32, count: i32, buf: usize, pitch: i32, rev: usize, out: bool, scale: f64, ltw: usize, coarse: i32, tStep: i32, r: i32): void {
  const sc = f64x2.splat(scale);
  for (let j: i32 = 0; j < n2; j += 4) {
    for (let b: i32 = 0; b < count; b++) {
      const row = p + (<usize>(b * n2 + j) << 4);
      const a = (r + b) * tStep;
      const t1 = ltw + (<usize>((a >> 4) * n2 + j) << 4);
      const t2 = ltw + (<usize>((coarse + (a & 15)) * n2 + j) << 4);
      for (let q: i32 = 0; q < 4; q++) {
        const o = <usize>q << 4;
        const at = buf + <usize>((rev != 0 ? load<i32>(rev + (<usize>(j + q) << 2)) : j + q) * pitch) + (<usize>b << 4);
        if (out) {
          let x = f64x2.mul(v128.load(at), sc);
          if (ltw != 0) x = times(times(x, v128.load(t1 + o), true), v128.load(t2 + o), true);
          v128.store(row + o, x);
        } else {
          let x = v128.load(row + o);
          if (ltw != 0) x = times(times(x, v128.load(t1 + o), false), v128.load(t2 + o), false);
          v128.store(at, x);
        }
      }
    }
  }
}

/** Transform `count` rows of n points (from p) into buf, natural order: transformToBuf reading each row whole. */
function rowsToBuf(p: usize, n: i32, count: i32, buf: usize, rev: usize, tw: usize, inverse: bool): void {
  const pitch = count << 4;
  rowsCopy(p, n, count, buf, pitch, rev, false, 1.0, 0, 0, 0, 0);
  firstStage(buf, n, pitch, count, rotation(inverse), tw);
  stagesInBuf(buf, n, pitch, count, tw, inverse);
}

/** Transform bit-reversed data in buf and write it to `count` rows of n points at p (times `scale`), each row written whole. */
function bufToRows(buf: usize, p: usize, n: i32, count: i32, tw: usize, inverse: bool, scale: f64): void {
  const pitch = count << 4;
  firstStage(buf, n, pitch, count, rotation(inverse), tw);
  stagesInBuf(buf, n, pitch, count, tw, inverse);
  rowsCopy(p, n, count, buf, pitch, 0, true, scale, 0, 0, 0, 0);
}

/** Transform `count` rows of n points in place through buf (times `scale`): the arithmetic of transformInPlace, rows read and written whole. */
function rowsInPlace(p: usize, n: i32, count: i32, buf: usize, rev: usize, tw: usize, inverse: bool, scale: f64): void {
  rowsToBuf(p, n, count, buf, rev, tw, inverse);
  rowsCopy(p, n, count, buf, count << 4, 0, true, scale, 0, 0, 0, 0);
}

/** x·w, or x·conj(w) with `conj`. */
@inline function times(x: v128, w: v128, conj: bool): v128 {
  const wi = f64x2.mul(v128.shuffle<f64>(w, w, 1, 1), conj ? f64x2(1.0, -1.0) : f64x2(-1.0, 1.0));
  return cmul(x, v128.shuffle<f64>(w, w, 0, 0), wi);
}

/**
 * The long drift's phase on a transformed block of rows r … r+count−1 (natural
 * order in buf), to buf2 in bit-reversed order: wavenumber index r + b + rows·k2,
 * phase table `phase` (none when 0: the sum only), and with `kk` non-zero Σ k²|ψ_k|² added to `sum` first.
 */
@inline function longPhase(buf: usize, buf2: usize, n2: i32, rows: i32, count: i32, pitch: i32, r: i32, rev: usize, phase: usize, kk: usize, sum: v128): v128 {
  const conjRe = f64x2(-1.0, 1.0);
  for (let j: i32 = 0; j < n2; j++) {
    const s = buf + <usize>(j * pitch);
    const d = buf2 + <usize>(load<i32>(rev + (<usize>j << 2)) * pitch);
    const k0 = r + rows * j;
    for (let b: i32 = 0; b < count; b++) {
      const x = v128.load(s + (<usize>b << 4));
      if (kk != 0) sum = f64x2.add(sum, f64x2.mul(f64x2.splat(load<f64>(kk + (<usize>(k0 + b) << 3))), f64x2.mul(x, x)));
      if (phase == 0) continue;
      const e = v128.load(phase + (<usize>(k0 + b) << 4));
      v128.store(d + (<usize>b << 4), cmul(x, v128.shuffle<f64>(e, e, 0, 0), f64x2.mul(v128.shuffle<f64>(e, e, 1, 1), conjRe)));
    }
  }
  return sum;
}

/**
 * Rows [lo, hi) of a long grid's matrix of `rows` rows of n2 cells at `data`
 * (LongLayout), BLOCK rows at a time. Row a's twiddles e^{−2πi·A·j/N},
 * A = a·tStep, are the product of coarse row ⌊A/16⌋ of `ltw` (`coarse` rows)
 * and fine row A mod 16 after them, each twiddle a product of the same two
 * table entries whatever the block. LONG_FORWARD twiddles and transforms
 * forward (with `kk` non-zero returning Σ k²|ψ_k|²); LONG_INVERSE transforms
 * back (normalised) and multiplies by the conjugate twiddles; LONG_DRIFT does
 * both with the phase of each wavenumber between (`phase`, and `kk` as for
 * LONG_FORWARD, summed before the phase).
 */
export function longRows(
  data: usize, rows: i32, n2: i32, lo: i32, hi: i32, buf: usize, buf2: usize, twF: usize, twI: usize, rev: usize,
  ltw: usize, coarse: i32, tStep: i32, mode: i32, phase: usize, kk: usize,
): f64 {
  let sum = f64x2.splat(0);
  for (let r = lo; r < hi; r += LONG_BLOCK) {
    const count = min(LONG_BLOCK, hi - r);
    const pitch = count << 4;
    const p = data + (<usize>(r * n2) << 4);
    if (mode == LONG_INVERSE) {
      rowsCopy(p, n2, count, buf, pitch, 0, false, 1.0, 0, 0, 0, r);
      transformToBuf(buf, pitch, 16, n2, count, buf2, pitch, rev, twI, true);
      rowsCopy(p, n2, count, buf2, pitch, 0, true, 1.0 / <f64>n2, ltw, coarse, tStep, r);
      continue;
    }
    rowsCopy(p, n2, count, buf, pitch, 0, false, 1.0, ltw, coarse, tStep, r);
    transformToBuf(buf, pitch, 16, n2, count, buf2, pitch, rev, twF, false);
    if (mode == LONG_FORWARD) {
      if (kk != 0) sum = longPhase(buf2, 0, n2, rows, count, pitch, r, rev, 0, kk, sum);
      rowsCopy(p, n2, count, buf2, pitch, 0, true, 1.0, 0, 0, 0, r);
      continue;
    }
    sum = longPhase(buf2, buf, n2, rows, count, pitch, r, rev, phase, kk, sum);
    transformBufToMemory(buf, n2, pitch, count, twI, true, buf2, pitch, 16, 1.0 / <f64>n2);
    rowsCopy(p, n2, count, buf2, pitch, 0, true, 1.0, ltw, coarse, tStep, r);
  }
  return f64x2.extract_lane(sum, 0) + f64x2.extract_lane(sum, 1);
}

/**
 * The periodic Poisson solve of a long grid between its forward and inverse
 * four-step transforms: `data` holds Z, the transform of the density's m
 * complex pairs z_j = ρ_2j + iρ_2j+1, in transposed order (rows of n2,
 * index k = a + rows·k2). For each pair of indices k and m − k, at once: the
 * real spectrum X_k = E_k + W^k O_k and X_{m−k} = conj(E_k − W^k O_k) with
 * E_k = (Z_k + conj Z_{m−k})/2, O_k = −i(Z_k − conj Z_{m−k})/2,
 * W = e^{−2πi/2m}; Y = −X/k² (kernel `kp`, index 0 … m, 0 at k = 0); and
 * back, Z'_k = E' + iO' with E' = (Y_k + conj Y_{m−k})/2,
 * O' = (Y_k − conj Y_{m−k}) conj(W^k)/2, Z'_{m−k} = conj E' + i conj O'.
 * Unit u pairs row u with row rows − u (u = 0 … rows/2).
 */
export function longPairs(data: usize, rows: i32, n2: i32, lo: i32, hi: i32, kp: usize, ctw: usize): void {
  const m = rows * n2;
  for (let u = lo; u < hi; u++) {
    if (u == 0) {
      // row 0: column c pairs with (n2 − c) mod n2; c = 0 with itself (k = 0, m − k = m), c = n2/2 with itself
      for (let c: i32 = 0; c <= n2 >> 1; c++) {
        const k = rows * c;
        pairCell(data + (<usize>c << 4), data + (<usize>((n2 - c) & (n2 - 1)) << 4), k, m - k, kp, ctw);
      }
      continue;
    }
    const v = rows - u;
    const last = u == v ? n2 >> 1 : n2;
    for (let c: i32 = 0; c < last; c++) {
      const k = u + rows * c;
      pairCell(data + (<usize>(u * n2 + c) << 4), data + (<usize>(v * n2 + n2 - 1 - c) << 4), k, m - k, kp, ctw);
    }
  }
}

@inline function conjugate(x: v128): v128 {
  return f64x2.mul(x, f64x2(1.0, -1.0));
}

/** i·x. */
@inline function timesI(x: v128): v128 {
  return f64x2.mul(swap(x), f64x2(-1.0, 1.0));
}

@inline function green(kp: usize, k: i32): v128 {
  const kk = load<f64>(kp + (<usize>k << 3));
  return f64x2.splat(kk > 0 ? -1.0 / kk : 0.0);
}

/** One pair of longPairs: Z_k at pk, Z_j at pj (j = m − k; the same address when k = j or k = 0). */
@inline function pairCell(pk: usize, pj: usize, k: i32, j: i32, kp: usize, ctw: usize): void {
  const half = f64x2.splat(0.5);
  const zk = v128.load(pk);
  const zj = conjugate(v128.load(pj));
  const e = f64x2.mul(half, f64x2.add(zk, zj));
  const o = f64x2.mul(half, conjugate(swap(f64x2.sub(zk, zj)))); // −i(Z_k − conj Z_j)/2
  const c = load<f64>(ctw + (<usize>k << 4));
  const s = load<f64>(ctw + (<usize>k << 4), 8);
  const wo = cmul(o, f64x2.splat(c), f64x2(s, -s)); // W^k O, W^k = c − is
  const yk = f64x2.mul(green(kp, k), f64x2.add(e, wo));
  const yjc = f64x2.mul(green(kp, j), f64x2.sub(e, wo)); // conj Y_j = g_j (E − W^k O)
  const e2 = f64x2.mul(half, f64x2.add(yk, yjc));
  const o2 = cmul(f64x2.mul(half, f64x2.sub(yk, yjc)), f64x2.splat(c), f64x2(-s, s)); // × conj W^k = c + is
  v128.store(pj, f64x2.add(conjugate(e2), timesI(conjugate(o2))));
  v128.store(pk, f64x2.add(e2, timesI(o2)));
}

/**
 * Real-to-complex transforms of rows [lo, hi) of a real array with rows of
 * n2 values into half-spectrum rows of n2/2 + 1 complex values: the row is
 * read as n2/2 complex numbers (even samples real, odd imaginary), transformed
 * (tables `tw`, `rev` of length m = n2/2), and untangled with the twiddles
 * `ctw` = (cos 2πk/n2, sin 2πk/n2), k = 0 … m, as RealFft.forwardRows does.
 */
export function realRows(input: usize, out: usize, n2: i32, lo: i32, hi: i32, buf: usize, tw: usize, rev: usize, ctw: usize): void {
  const m = n2 >> 1;
  const h2 = m + 1;
  const half = f64x2.splat(0.5);
  const conj = f64x2(1.0, -1.0);
  const long = m >= LONG_ROW;
  const block = rowsBlock(m);
  for (let r = lo; r < hi; r += block) {
    const count = min(block, hi - r);
    const pitch = count << 4;
    const rows = input + (<usize>(r * n2) << 3);
    if (long) rowsToBuf(rows, m, count, buf, rev, tw, false);
    else transformToBuf(rows, 16, n2 << 3, m, count, buf, pitch, rev, tw, false);
    const dst = out + (<usize>(r * h2) << 4);
    for (let k: i32 = 0; k <= m; k++) {
      const zk = buf + <usize>((k == m ? 0 : k) * pitch);
      const wk = buf + <usize>((k == 0 ? 0 : m - k) * pitch);
      const c = load<f64>(ctw + (<usize>k << 4));
      const s = load<f64>(ctw + (<usize>k << 4), 8);
      const cr = f64x2.splat(c);
      const ci = f64x2(s, -s); // multiply by (c − i s)
      for (let b: i32 = 0; b < count; b++) {
        const z = v128.load(zk + (<usize>b << 4));
        const w = f64x2.mul(v128.load(wk + (<usize>b << 4)), conj);
        const e = f64x2.mul(half, f64x2.add(z, w));
        const od = f64x2.mul(f64x2.mul(half, swap(f64x2.sub(z, w))), conj);
        v128.store(dst + <usize>((b * h2 + k) << 4), f64x2.add(e, cmul(od, cr, ci)));
      }
    }
  }
}

/** The inverse of realRows: half-spectrum rows [lo, hi) to real rows of n2 values, normalised (1/m per row transform). */
export function realRowsInverse(spec: usize, out: usize, n2: i32, lo: i32, hi: i32, buf: usize, tw: usize, rev: usize, ctw: usize): void {
  const m = n2 >> 1;
  const h2 = m + 1;
  const half = f64x2.splat(0.5);
  const conj = f64x2(1.0, -1.0);
  const long = m >= LONG_ROW;
  const block = rowsBlock(m);
  for (let r = lo; r < hi; r += block) {
    const count = min(block, hi - r);
    const pitch = count << 4;
    const src = spec + (<usize>(r * h2) << 4);
    for (let k: i32 = 0; k < m; k++) {
      const d = buf + <usize>(load<i32>(rev + (<usize>k << 2)) * pitch);
      const c = load<f64>(ctw + (<usize>k << 4));
      const s = load<f64>(ctw + (<usize>k << 4), 8);
      const cr = f64x2.splat(c);
      const ci = f64x2(-s, s); // multiply by (c + i s)
      for (let b: i32 = 0; b < count; b++) {
        const x = v128.load(src + <usize>((b * h2 + k) << 4));
        const y = f64x2.mul(v128.load(src + <usize>((b * h2 + m - k) << 4)), conj);
        const e = f64x2.mul(half, f64x2.add(x, y));
        const o = cmul(f64x2.mul(half, f64x2.sub(x, y)), cr, ci);
        // Z = E + iO = (er − oi, ei + or)
        v128.store(d + (<usize>b << 4), f64x2.add(e, f64x2.mul(swap(o), f64x2(-1.0, 1.0))));
      }
    }
    const rows = out + (<usize>(r * n2) << 3);
    if (long) bufToRows(buf, rows, m, count, tw, true, 1.0 / <f64>m);
    else transformBufToMemory(buf, m, pitch, count, tw, true, rows, 16, n2 << 3, 1.0 / <f64>m);
  }
}


// sin and cos of two angles at once, from a table and short polynomials: for x = |angle|,
// k = nearest(x / (π/64)) and r = x − k·π/64 with π/64 split in four parts (Cody & Waite; fdlibm's
// parts of π/2 divided by 32, exact), so |r| ≤ π/128, accurate to its last bits next to the zeros of sin and cos; then with (C, S) = (cos, sin)(kπ/64) from a table
// of 128 entries (one turn) and the Taylor polynomials sin r = r + r³(−1/3! + r²/5! − r⁴/7!) and
// cos r − 1 = −r²/2 + r⁴(1/4! − r²/6! + r⁴/8!) (next terms below 1e-18 of the value on |r| ≤ π/128):
// sin x = S + (C sin r + S (cos r − 1)), cos x = C + (C (cos r − 1) − S sin r), the small correction added
// last to the table value, so the result is within about an ulp. sin takes the angle's sign, so sin is odd
// and cos even bit for bit. Angles beyond 3e4 in magnitude go through the scalar library functions
// instead (the parts' products with k are exact only for k < 2^20). The module must not carry static data
// (the memory is all JavaScript's), so the table is written by initConstants from the host's sin and cos.
@external("env", "sin") declare function hostSin(x: f64): f64;
@external("env", "cos") declare function hostCos(x: f64): f64;
const PIO2_1: f64 = 1.57079632673412561417e+00;
const PIO2_2: f64 = 6.07710050630396597660e-11;
const PIO2_3: f64 = 2.02226624871116645580e-21;
const PIO2_3T: f64 = 8.47842766036889956997e-32;
/** Table entries per turn (a power of two): the table's step is π/64. */
const TURN: i32 = 128;
const LARGE_ANGLE: f64 = 3.0e4;

// The constants as (c, c) vectors at a fixed address, then the table of (cos, sin)(jπ/64), j < TURN, all
// written once by initConstants(): loading them is cheaper than rebuilding each 128-bit constant from
// immediates inside the loop.
const CONSTANTS: usize = <usize>CONSTANTS_ADDRESS;
const K_INV_STEP: usize = 0;
const K_STEP_1: usize = 16;
const K_STEP_2: usize = 32;
const K_STEP_3: usize = 48;
const K_S: usize = 64; // −1/3!, 1/5!, −1/7! at 64, 80, 96
const K_C: usize = 112; // 1/4!, −1/6!, 1/8! at 112, 128, 144
const K_HALF: usize = 160;
const K_SIGN: usize = 176;
const K_INDEX: usize = 192;
const K_STEP_4: usize = 208;
const K_TABLE: usize = 256;
/** Bytes at CONSTANTS the layout must leave free. */
export const CONSTANTS_BYTES: i32 = <i32>K_TABLE + TURN * 16;

/** Write the constants and the table (call once per memory, before any kick). */
export function initConstants(): void {
  const step = 1.0 / <f64>(TURN >> 2); // π/64 = (π/2)/32, so the parts of π/2 times this power of two
  put(K_INV_STEP, <f64>(TURN >> 2) / (PIO2_1 + PIO2_2));
  put(K_STEP_1, PIO2_1 * step);
  put(K_STEP_2, PIO2_2 * step);
  put(K_STEP_3, PIO2_3 * step);
  put(K_STEP_4, PIO2_3T * step);
  put(K_S, -1.0 / 6.0);
  put(K_S + 16, 1.0 / 120.0);
  put(K_S + 32, -1.0 / 5040.0);
  put(K_C, 1.0 / 24.0);
  put(K_C + 16, -1.0 / 720.0);
  put(K_C + 32, 1.0 / 40320.0);
  put(K_HALF, 0.5);
  v128.store(CONSTANTS + K_SIGN, i64x2.splat(0x8000000000000000));
  v128.store(CONSTANTS + K_INDEX, i32x4.splat(TURN - 1));
  fillTable(step);
}

/**
 * The table: the first eighth of a turn from the host's sin and cos at j·π/64 with the angle's rounding
 * error as a first-order correction, the rest by the exact symmetries (quarter turns exactly 0 and ±1).
 */
function fillTable(step: f64): void {
  const quarter = TURN >> 2;
  for (let j: i32 = 0; j <= quarter; j++) {
    // beyond an eighth of a turn, cos and sin of the angle mirrored at π/4
    const m = 2 * j <= quarter ? j : quarter - j;
    const a = <f64>m * (PIO2_1 * step); // exact: PIO2_1 has 33 significant bits
    const b = <f64>m * (PIO2_2 * step);
    const hi = a + b;
    const lo = (a - hi) + b;
    const sm = hostSin(hi) + hostCos(hi) * lo;
    const cm = hostCos(hi) - hostSin(hi) * lo;
    if (m == j) tableEntry(j, cm, sm);
    else tableEntry(j, sm, cm);
  }
  for (let j: i32 = quarter + 1; j < TURN; j++) {
    // a quarter turn on: (cos, sin) → (−sin, cos)
    const prev = CONSTANTS + K_TABLE + (<usize>(j - quarter) << 4);
    tableEntry(j, -load<f64>(prev, 8), load<f64>(prev));
  }
}

@inline function tableEntry(j: i32, c: f64, s: f64): void {
  const at = CONSTANTS + K_TABLE + (<usize>j << 4);
  store<f64>(at, c);
  store<f64>(at, s, 8);
}

@inline function put(at: usize, x: f64): void {
  v128.store(CONSTANTS + at, f64x2.splat(x));
}

@inline function kc(at: usize): v128 {
  return v128.load(CONSTANTS + at);
}

/** ψ ← e^{i·angle} ψ for two consecutive cells at address p (angle lanes 0, 1). */
@inline function rotatePair(p: usize, angle: v128): void {
  let s: v128;
  let c: v128;
  if (f64x2.extract_lane(f64x2.abs(angle), 0) > LARGE_ANGLE || f64x2.extract_lane(f64x2.abs(angle), 1) > LARGE_ANGLE) {
    const a0 = f64x2.extract_lane(angle, 0);
    const a1 = f64x2.extract_lane(angle, 1);
    s = f64x2(hostSin(a0), hostSin(a1));
    c = f64x2(hostCos(a0), hostCos(a1));
  } else {
    const x = f64x2.abs(angle);
    const k = f64x2.nearest(f64x2.mul(x, kc(K_INV_STEP)));
    const r3 = f64x2.sub(f64x2.sub(f64x2.sub(x, f64x2.mul(k, kc(K_STEP_1))), f64x2.mul(k, kc(K_STEP_2))), f64x2.mul(k, kc(K_STEP_3)));
    const r = f64x2.sub(r3, f64x2.mul(k, kc(K_STEP_4)));
    const z = f64x2.mul(r, r);
    const z2 = f64x2.mul(z, z);
    const ps = f64x2.add(f64x2.add(kc(K_S), f64x2.mul(z, kc(K_S + 16))), f64x2.mul(z2, kc(K_S + 32)));
    const pc = f64x2.add(f64x2.add(kc(K_C), f64x2.mul(z, kc(K_C + 16))), f64x2.mul(z2, kc(K_C + 32)));
    const sr = f64x2.add(r, f64x2.mul(f64x2.mul(r, z), ps));
    const cm = f64x2.sub(f64x2.mul(z2, pc), f64x2.mul(z, kc(K_HALF)));
    // the table entries of k mod TURN (k < 2^21 here, so the integer conversion is exact)
    const j = i32x4.shl(v128.and(i32x4.trunc_sat_f64x2_s_zero(k), kc(K_INDEX)), 4);
    const e0 = v128.load(CONSTANTS + K_TABLE + <usize>i32x4.extract_lane(j, 0));
    const e1 = v128.load(CONSTANTS + K_TABLE + <usize>i32x4.extract_lane(j, 1));
    const ct = v128.shuffle<f64>(e0, e1, 0, 2);
    const st = v128.shuffle<f64>(e0, e1, 1, 3);
    s = v128.xor(f64x2.add(st, f64x2.add(f64x2.mul(ct, sr), f64x2.mul(st, cm))), v128.and(angle, kc(K_SIGN)));
    c = f64x2.add(ct, f64x2.sub(f64x2.mul(ct, cm), f64x2.mul(st, sr)));
  }
  // the two cells as (re₀, re₁) and (im₀, im₁): re' = re·c − im·s, im' = im·c + re·s (the products and sums of a
  // complex multiplication by c + is, so the same numbers as multiplying each cell alone)
  const x0 = v128.load(p);
  const x1 = v128.load(p, 16);
  const re = v128.shuffle<f64>(x0, x1, 0, 2);
  const im = v128.shuffle<f64>(x0, x1, 1, 3);
  const re2 = f64x2.sub(f64x2.mul(re, c), f64x2.mul(im, s));
  const im2 = f64x2.add(f64x2.mul(im, c), f64x2.mul(re, s));
  v128.store(p, v128.shuffle<f64>(re2, im2, 0, 2));
  v128.store(p, v128.shuffle<f64>(re2, im2, 1, 3), 16);
}

/**
 * ψ ← e^{−iK(φ + g|s|²)} ψ over cells [lo, hi) (an even count, from an even
 * start), K = `factor`, g = `contact`, s the field at `src` (ψ itself, or the
 * reference field of a tangent); g = 0 is the plain kick e^{−iKφ}.
 */
export function kick(psi: usize, src: usize, phi: usize, factor: f64, contact: f64, lo: i32, hi: i32): void {
  const f = f64x2.splat(-factor);
  if (contact == 0) {
    for (let i = lo; i < hi; i += 2) {
      rotatePair(psi + (<usize>i << 4), f64x2.mul(v128.load(phi + (<usize>i << 3)), f));
    }
    return;
  }
  const g = f64x2.splat(contact);
  for (let i = lo; i < hi; i += 2) {
    const a = v128.load(src + (<usize>i << 4));
    const b = v128.load(src + (<usize>i << 4), 16);
    const aa = f64x2.mul(a, a);
    const bb = f64x2.mul(b, b);
    const rho = f64x2.add(v128.shuffle<f64>(aa, bb, 0, 2), v128.shuffle<f64>(aa, bb, 1, 3));
    const v = f64x2.add(v128.load(phi + (<usize>i << 3)), f64x2.mul(g, rho));
    rotatePair(psi + (<usize>i << 4), f64x2.mul(v, f));
  }
}

/** e^{i·angle} applied to (1, 0) for `count` angles (pairs): writes (cos, sin) per angle, for testing the sincos. */
export function sinCos(angles: usize, out: usize, count: i32): void {
  for (let i = 0; i < count; i += 2) {
    v128.store(out + (<usize>i << 4), f64x2(1.0, 0.0));
    v128.store(out + (<usize>i << 4), f64x2(1.0, 0.0), 16);
    rotatePair(out + (<usize>i << 4), v128.load(angles + (<usize>i << 3)));
  }
}

/**
 * The drift's phase table: (cos, sin) of −½ k² D for `count` entries of the k²
 * table `kk` (an even count; tables are padded to one), written to `out`.
 */
export function phaseTable(kk: usize, factor: f64, out: usize, count: i32): void {
  const f = f64x2.splat(-0.5 * factor);
  for (let i: i32 = 0; i < count; i += 2) {
    const p = out + (<usize>i << 4);
    v128.store(p, f64x2(1.0, 0.0));
    v128.store(p, f64x2(1.0, 0.0), 16);
    rotatePair(p, f64x2.mul(v128.load(kk + (<usize>i << 3)), f));
  }
}

/**
 * Sums over cells [lo, hi) (an even count, from an even start) of ψ and φ, written to `out` as six
 * doubles: Σ|ψ|², Σ|ψ|⁴, Σ|ψ|²φ, max |ψ|², min φ, max φ. Two cells at a time in the two lanes.
 */
export function moments(psi: usize, phi: usize, lo: i32, hi: i32, out: usize): void {
  let mass = f64x2.splat(0.0);
  let rho2 = f64x2.splat(0.0);
  let rhoPhi = f64x2.splat(0.0);
  let rhoMax = f64x2.splat(0.0);
  let phiMin = f64x2.splat(Infinity);
  let phiMax = f64x2.splat(-Infinity);
  for (let i = lo; i < hi; i += 2) {
    const a = v128.load(psi + (<usize>i << 4));
    const b = v128.load(psi + (<usize>i << 4), 16);
    const aa = f64x2.mul(a, a);
    const bb = f64x2.mul(b, b);
    const rho = f64x2.add(v128.shuffle<f64>(aa, bb, 0, 2), v128.shuffle<f64>(aa, bb, 1, 3));
    const p = v128.load(phi + (<usize>i << 3));
    mass = f64x2.add(mass, rho);
    rho2 = f64x2.add(rho2, f64x2.mul(rho, rho));
    rhoPhi = f64x2.add(rhoPhi, f64x2.mul(rho, p));
    rhoMax = f64x2.max(rhoMax, rho);
    phiMin = f64x2.min(phiMin, p);
    phiMax = f64x2.max(phiMax, p);
  }
  store<f64>(out, f64x2.extract_lane(mass, 0) + f64x2.extract_lane(mass, 1));
  store<f64>(out, f64x2.extract_lane(rho2, 0) + f64x2.extract_lane(rho2, 1), 8);
  store<f64>(out, f64x2.extract_lane(rhoPhi, 0) + f64x2.extract_lane(rhoPhi, 1), 16);
  store<f64>(out, Math.max(f64x2.extract_lane(rhoMax, 0), f64x2.extract_lane(rhoMax, 1)), 24);
  store<f64>(out, Math.min(f64x2.extract_lane(phiMin, 0), f64x2.extract_lane(phiMin, 1)), 32);
  store<f64>(out, Math.max(f64x2.extract_lane(phiMax, 0), f64x2.extract_lane(phiMax, 1)), 40);
}

// For an odd log2 n ≥ 3 the first stage is radix 2 and the next one radix 4 of quarter length 2: both
// touch only the eight rows 8s … 8s+7 of a block, so they run fused, in registers, one pass over buf fewer.
// Each value goes through exactly the additions and products of the two stages one after the other (the
// twiddles of the second, k = 1, hoisted), so the result is the same bit for bit.

/** Radix 2 on the pairs (a0, a1) … (e0, e1), then radix 4 (h = 2) on the eight results, stored to rows d … d + 7·pitch. */
@inline function radix2Then4(
  a0: v128, a1: v128, b0: v128, b1: v128, c0: v128, c1: v128, e0: v128, e1: v128, rot: v128, d: usize, pitch: usize,
  w1r: v128, w1i: v128, w2r: v128, w2i: v128, w3r: v128, w3i: v128, one: v128,
): void {
  const r0 = f64x2.add(a0, a1);
  const r1 = f64x2.sub(a0, a1);
  const r2 = f64x2.add(b0, b1);
  const r3 = f64x2.sub(b0, b1);
  const r4 = f64x2.add(c0, c1);
  const r5 = f64x2.sub(c0, c1);
  const r6 = f64x2.add(e0, e1);
  const r7 = f64x2.sub(e0, e1);
  plainRadix4(r0, r2, r4, r6, rot, d, d + 2 * pitch, d + 4 * pitch, d + 6 * pitch, one, false);
  const t2 = cmul(r3, w2r, w2i);
  const t1 = cmul(r5, w1r, w1i);
  const t3 = cmul(r7, w3r, w3i);
  plainRadix4(r1, t2, t1, t3, rot, d + pitch, d + 3 * pitch, d + 5 * pitch, d + 7 * pitch, one, false);
}

/**
 * The first two stages for an odd log2 n ≥ 3 (tw: the transform's twiddle table): with a bit-reversal
 * permutation `rev`, gathered from memory as gatherFirst gathers; with rev = 0, in place on bit-reversed rows
 * already in buf (src = buf, pencilStride = 16), as firstStage.
 */
function firstTwoStages(src: usize, pointStride: i32, pencilStride: i32, n: i32, count: i32, buf: usize, pitch: i32, rev: usize, rot: v128, tw: usize): void {
  const one = f64x2.splat(1.0);
  const tk = tw + <usize>TWIDDLE_STRIDE;
  const w1r = v128.load(tk);
  const w1i = v128.load(tk, 16);
  const w2r = v128.load(tk, 32);
  const w2i = v128.load(tk, 48);
  const w3r = v128.load(tk, 64);
  const w3i = v128.load(tk, 80);
  const p = <usize>pitch;
  // the radix-2 stage pairs rows t + 2i and t + 2i + 1: points rev[t + 2i] and rev[t + 2i] + n/2, or neighbouring rows
  const half = rev ? <usize>((n >> 1) * pointStride) : p;
  for (let t: i32 = 0; t < n; t += 8) {
    const d = buf + <usize>(t * pitch);
    let s0 = d;
    let s1 = d + 2 * p;
    let s2 = d + 4 * p;
    let s3 = d + 6 * p;
    if (rev) {
      s0 = src + <usize>(load<i32>(rev + (<usize>t << 2)) * pointStride);
      s1 = src + <usize>(load<i32>(rev + (<usize>(t + 2) << 2)) * pointStride);
      s2 = src + <usize>(load<i32>(rev + (<usize>(t + 4) << 2)) * pointStride);
      s3 = src + <usize>(load<i32>(rev + (<usize>(t + 6) << 2)) * pointStride);
    }
    for (let b: i32 = 0; b < count; b++) {
      const o = <usize>(b * pencilStride);
      radix2Then4(
        v128.load(s0 + o), v128.load(s0 + half + o), v128.load(s1 + o), v128.load(s1 + half + o),
        v128.load(s2 + o), v128.load(s2 + half + o), v128.load(s3 + o), v128.load(s3 + half + o),
        rot, d + (<usize>b << 4), p, w1r, w1i, w2r, w2i, w3r, w3i, one,
      );
    }
  }
}
