// The diagnostics' passes over a grid (diagnostics/split-passes.ts, density-pdf.ts, the power spectrum's
// shells) in WebAssembly, on the transforms' shared memory: the same arithmetic in the same order as their
// JavaScript versions, cell by cell and sum by sum (no fused multiply-add, IEEE doubles on both sides), so the
// results are the same bits. Compiled by `npm run build:wasm` to dist/fields/wasm/field-passes.wasm; every
// argument named as an array is a byte address, every count and index an element count. The layout of the
// tables these passes read (wavenumbers, shells, block sums) is declared in diagnostics/block-tables.ts.

// log10 of the host (the density PDF's bin of a contrast close to a bin edge is decided by the defining formula)
@external("env", "log10")
declare function hostLog10(x: f64): f64;

@inline function f(at: usize, i: i32): f64 {
  return load<f64>(at + (<usize>i << 3));
}

@inline function setF(at: usize, i: i32, v: f64): void {
  store<f64>(at + (<usize>i << 3), v);
}

@inline function addF(at: usize, i: i32, v: f64): void {
  const p = at + (<usize>i << 3);
  store<f64>(p, load<f64>(p) + v);
}

@inline function bin16(at: usize, i: i32): i32 {
  return <i32>load<i16>(at + (<usize>i << 1));
}

/** JavaScript's Math.round of x ≥ 0: the nearer integer, a tie upwards (x − ⌊x⌋ is exact). */
@inline function roundUp(x: f64): f64 {
  const r = Math.floor(x);
  return x - r >= 0.5 ? r + 1 : r;
}

/**
 * The shells of the half space (shells.ts modeShells): for rows (a, b) and 0 ≤ c ≤ n2/2 the shell of
 * |k| = √(k_a² + k_b² + k_c²) into the int16 table `bins` (rows of n2/2 + 1), −1 for k = 0; and Σ|k| and the mode
 * count of each shell over every mode in storage order (c and n2 − c share k², so |k| of c > n2/2 is its mirror's).
 */
export function shellTable(bins: usize, ksum: usize, modes: usize, k0: usize, k1: usize, k2: usize, n0: i32, n1: i32, n2: i32, kF: f64, count: i32, row: usize): void {
  const half = n2 >> 1;
  const last = <f64>(count - 1);
  for (let a = 0, r = 0; a < n0; a++) {
    for (let b = 0; b < n1; b++, r++) {
      const kab = f(k0, a) * f(k0, a) + f(k1, b) * f(k1, b);
      const at = bins + (<usize>(r * (half + 1)) << 1);
      for (let c = 0; c <= half; c++) {
        const k = Math.sqrt(kab + f(k2, c) * f(k2, c));
        setF(row, c, k);
        const shell = k == 0 ? -1 : <i32>Math.min(last, Math.max(0, roundUp(k / kF) - 1));
        store<i16>(at + (<usize>c << 1), <i16>shell);
      }
      for (let c = 0; c < n2; c++) {
        const m = c <= half ? c : n2 - c;
        const shell = <i32>load<i16>(at + (<usize>m << 1));
        if (shell < 0) continue;
        addF(ksum, shell, f(row, m));
        addF(modes, shell, 1);
      }
    }
  }
}

/** z ← i (row + zScale k_c) z over rows [first, end) of n2 modes: one row's derivative factor per row (axis 0: k0[a], axis 1: k1[b], axis 2: 0 and zScale 1). */
export function ikRows(z: usize, k: usize, kz: usize, n1: i32, n2: i32, axis: i32, first: i32, end: i32): void {
  const zScale: f64 = axis == 2 ? 1 : 0;
  for (let r = first; r < end; r++) {
    const a = r / n1;
    const b = r % n1;
    const row = axis == 0 ? f(k, a) : axis == 1 ? f(k, b) : 0;
    let p = z + (<usize>(r * n2) << 4);
    for (let c = 0; c < n2; c++, p += 16) {
      const kk = row + zScale * f(kz, c);
      const re = load<f64>(p);
      store<f64>(p, -kk * load<f64>(p, 8));
      store<f64>(p, kk * re, 8);
    }
  }
}

/**
 * z ← u + i w over cells [from, to) from ψ and the derivative in z (split-passes.ts packRow); Σ j²/ρ and Σ j
 * added into acc[0], acc[1]. Two cells a turn in the lanes of 128-bit vectors (each lane's arithmetic is the
 * scalar's), their sums added cell by cell in order.
 */
export function packCells(psi: usize, z: usize, from: i32, to: i32, acc: usize): void {
  let bulk2 = load<f64>(acc);
  let js = load<f64>(acc, 8);
  const zero = f64x2.splat(0);
  const tiny = f64x2.splat(1e-300);
  const pairs = from + ((to - from) & ~1);
  for (let i = from; i < pairs; i += 2) {
    const q = psi + (<usize>i << 4);
    const p = z + (<usize>i << 4);
    const a0 = v128.load(q);
    const a1 = v128.load(q, 16);
    const g0 = v128.load(p);
    const g1 = v128.load(p, 16);
    const re = v128.shuffle<f64>(a0, a1, 0, 2);
    const im = v128.shuffle<f64>(a0, a1, 1, 3);
    const gr = v128.shuffle<f64>(g0, g1, 0, 2);
    const gi = v128.shuffle<f64>(g0, g1, 1, 3);
    const rho = f64x2.add(f64x2.mul(re, re), f64x2.mul(im, im));
    const j = f64x2.sub(f64x2.mul(re, gi), f64x2.mul(im, gr));
    const flow = v128.bitselect(f64x2.div(f64x2.mul(j, j), rho), zero, f64x2.gt(rho, zero));
    bulk2 += f64x2.extract_lane(flow, 0);
    bulk2 += f64x2.extract_lane(flow, 1);
    js += f64x2.extract_lane(j, 0);
    js += f64x2.extract_lane(j, 1);
    const s = f64x2.sqrt(rho);
    const dense = f64x2.gt(rho, tiny);
    const u = v128.bitselect(f64x2.div(f64x2.add(f64x2.mul(re, gr), f64x2.mul(im, gi)), s), f64x2.sqrt(f64x2.add(f64x2.mul(gr, gr), f64x2.mul(gi, gi))), dense);
    const w = v128.bitselect(f64x2.div(j, s), zero, dense);
    v128.store(p, v128.shuffle<f64>(u, w, 0, 2));
    v128.store(p, v128.shuffle<f64>(u, w, 1, 3), 16);
  }
  for (let i = pairs; i < to; i++) {
    const q = psi + (<usize>i << 4);
    const p = z + (<usize>i << 4);
    const re = load<f64>(q);
    const im = load<f64>(q, 8);
    const gr = load<f64>(p);
    const gi = load<f64>(p, 8);
    const rho = re * re + im * im;
    const j = re * gi - im * gr;
    if (rho > 0) bulk2 += (j * j) / rho;
    js += j;
    if (rho > 1e-300) {
      const s = Math.sqrt(rho);
      store<f64>(p, (re * gr + im * gi) / s);
      store<f64>(p, j / s, 8);
    } else {
      store<f64>(p, Math.sqrt(gr * gr + gi * gi));
      store<f64>(p, 0.0, 8);
    }
  }
  store<f64>(acc, bulk2);
  store<f64>(acc, js, 8);
}

/** Where row (a, b) keeps its mirrors' k·W in the Nyquist rows' table (split-passes.ts nyquistRow), or −1. */
@inline function nyquistRow(n0: i32, n1: i32, n2: i32, a: i32, b: i32): i32 {
  const row = n0 > 1 && 2 * a == n0 ? b : n1 > 1 && 2 * b == n1 ? (n0 > 1 ? n1 : 0) + a : -1;
  return row < 0 ? -1 : row * (n2 + 2);
}

// The shell passes' totals in a block's sums (split-passes.ts SHELL_TOTALS and the order of its entries).
const TOTALS = 5;

/** Rows ahead whose mirror shellRows reads early (see there). */
const AHEAD = 4;

/**
 * split-passes.ts axisRow over rows [first, end) of one axis's packed transform z: the block's sums at `s`
 * (the totals, then per shell the quantum, incompressible and compressible energy and the velocity power),
 * k_axis W into `div` (assigned when `first`, else added), the Nyquist rows' mirrors into `nyq`. Each row's
 * modes pair with its mirror row's, read backwards from the end of another row: that stream is what this pass
 * waits for most (without it the pass takes less than half the time), so one value of each cache line of
 * the mirror of the row AHEAD rows on is loaded early (their sum returned, unused, so that the loads stay).
 */
export function shellRows(
  z: usize, div: usize, nyq: usize, bins: usize, k0: usize, k1: usize, k2: usize, n0: i32, n1: i32, n2: i32, count: i32,
  perMode: f64, velocityPerMode: f64, axis: i32, first: i32, s: usize, from: i32, end: i32,
): f64 {
  let early: f64 = 0;
  const half = n2 >> 1;
  const zScale: f64 = axis == 2 ? 1 : 0;
  const sq = TOTALS;
  const sw = sq + count;
  const sv = sq + 3 * count;
  let quantum = f(s, 0);
  let incompressible = f(s, 1);
  for (let r = from; r < end; r++) {
    const a = r / n1;
    const b = r % n1;
    const ma = a == 0 ? 0 : n0 - a;
    const mb = b == 0 ? 0 : n1 - b;
    const kRow = axis == 0 ? f(k0, a) : axis == 1 ? f(k1, b) : 0;
    const kMirror = axis == 0 ? f(k0, ma) : axis == 1 ? f(k1, mb) : 0;
    let e = nyquistRow(n0, n1, n2, a, b);
    const onNyquist = e >= 0;
    const mirror = 2 * (ma * n1 + mb) * n2;
    const row = z + (<usize>(r * n2) << 4);
    const binRow = r * (half + 1);
    if (r + AHEAD < end) {
      const na = (r + AHEAD) / n1;
      const nb = (r + AHEAD) % n1;
      const next = z + (<usize>(((na == 0 ? 0 : n0 - na) * n1 + (nb == 0 ? 0 : n1 - nb)) * n2) << 4);
      for (let c = n2 - half; c < n2; c += 4) early += load<f64>(next + (<usize>c << 4));
    }
    for (let c = 0, h = 2 * r * (half + 1); c <= half; c++, h += 2, e += 2) {
      const p = row + (<usize>c << 4);
      const m = z + (<usize>(mirror + (c == 0 ? 0 : 2 * (n2 - c))) << 3);
      const zr = load<f64>(p);
      const zi = load<f64>(p, 8);
      const mr = load<f64>(m);
      const mi = load<f64>(m, 8);
      const ur = 0.5 * (zr + mr);
      const ui = 0.5 * (zi - mi);
      const wr = 0.5 * (zi + mi);
      const wi = -0.5 * (zr - mr);
      const kj = kRow + zScale * f(k2, c);
      if (first) {
        setF(div, h, kj * wr);
        setF(div, h + 1, kj * wi);
      } else {
        setF(div, h, f(div, h) + kj * wr);
        setF(div, h + 1, f(div, h + 1) + kj * wi);
      }
      const weight: f64 = c == 0 || c == half ? 1 : 2;
      if (onNyquist && weight == 2) {
        const km = kMirror + zScale * f(k2, n2 - c);
        if (first) {
          setF(nyq, e, km * wr);
          setF(nyq, e + 1, -(km * wi));
        } else {
          setF(nyq, e, f(nyq, e) + km * wr);
          setF(nyq, e + 1, f(nyq, e + 1) - km * wi);
        }
      }
      const eq = weight * (ur * ur + ui * ui) * perMode;
      const ww = weight * (wr * wr + wi * wi);
      quantum += eq;
      incompressible += ww * perMode;
      const shell = bin16(bins, binRow + c);
      if (shell < 0) {
        addF(s, 3, ww * perMode);
        addF(s, 4, eq + ww * perMode);
        continue;
      }
      addF(s, sq + shell, eq);
      addF(s, sw + shell, ww * perMode);
      addF(s, sv + shell, ww * velocityPerMode);
    }
  }
  setF(s, 0, quantum);
  setF(s, 1, incompressible);
  return early;
}

/** split-passes.ts compressibleRow over rows [from, end): |k̂·W|² from `div` (and `nyq` on the Nyquist rows) into the block's sums at `s`. */
export function compressibleRows(
  div: usize, nyq: usize, bins: usize, k0: usize, k1: usize, k2: usize, n0: i32, n1: i32, n2: i32, count: i32, perMode: f64, s: usize, from: i32, end: i32,
): void {
  const half = n2 >> 1;
  const sw = TOTALS + count;
  const sc = sw + count;
  let compressible = f(s, 2);
  let incompressible = f(s, 1);
  for (let r = from; r < end; r++) {
    const a = r / n1;
    const b = r % n1;
    const kab = f(k0, a) * f(k0, a) + f(k1, b) * f(k1, b);
    let e = nyquistRow(n0, n1, n2, a, b);
    const onNyquist = e >= 0;
    const binRow = r * (half + 1);
    for (let c = 0, h = 2 * r * (half + 1); c <= half; c++, h += 2, e += 2) {
      const kk = kab + f(k2, c) * f(k2, c);
      if (kk == 0) continue;
      const dr = f(div, h);
      const di = f(div, h + 1);
      const own = dr * dr + di * di;
      let mirror: f64 = 0;
      if (c != 0 && c != half) {
        if (onNyquist) {
          const nr = f(nyq, e);
          const ni = f(nyq, e + 1);
          mirror = nr * nr + ni * ni;
        } else mirror = own;
      }
      const ec = ((own + mirror) / kk) * perMode;
      compressible += ec;
      incompressible -= ec;
      const shell = bin16(bins, binRow + c);
      addF(s, sc + shell, ec);
      addF(s, sw + shell, -ec);
    }
  }
  setF(s, 2, compressible);
  setF(s, 1, incompressible);
}

/** δ = |ψ|²/ρ̄ − 1 (imaginary part 0) over cells [from, to), for the power spectrum (analysis.ts). */
export function contrastCells(psi: usize, out: usize, mean: f64, from: i32, to: i32): void {
  for (let i = from; i < to; i++) {
    const q = psi + (<usize>i << 4);
    const re = load<f64>(q);
    const im = load<f64>(q, 8);
    store<f64>(out + (<usize>i << 4), (re * re + im * im) / mean - 1);
    store<f64>(out + (<usize>i << 4), 0.0, 8);
  }
}

/** Σ perMode |δ_k|² per shell over rows [from, end) of the spectrum, in storage order (c > n2/2 takes the shell of n2 − c). */
export function powerRows(data: usize, bins: usize, n2: i32, perMode: f64, sums: usize, from: i32, end: i32): void {
  const half = n2 >> 1;
  for (let r = from; r < end; r++) {
    const binRow = r * (half + 1);
    const row = data + (<usize>(r * n2) << 4);
    for (let c = 0; c < n2; c++) {
      const shell = bin16(bins, binRow + (c <= half ? c : n2 - c));
      if (shell < 0) continue;
      const re = load<f64>(row + (<usize>c << 4));
      const im = load<f64>(row + (<usize>c << 4), 8);
      addF(sums, shell, perMode * (re * re + im * im));
    }
  }
}

/**
 * log₂ of a positive normal double to within 0.008: its exponent, and log₂(1 + m) ≈ m + 0.3466 m (1 − m) of
 * its mantissa. Only a first guess of a bin (bins are rarely narrower than 0.05 in log₁₀), which the
 * comparisons with the edges then correct.
 */
@inline function quickLog2(r: f64): f64 {
  const bits = reinterpret<u64>(r);
  const m = reinterpret<f64>((bits & 0x000fffffffffffff) | 0x3ff0000000000000) - 1;
  return <f64>(<i32>(bits >> 52) - 1023) + m + 0.3466 * m * (1 - m);
}

/** The defining bin of contrast r (density-pdf.ts binOf). */
@inline function binOf(r: f64, lo: f64, width: f64, bins: i32): i32 {
  return <i32>Math.min(<f64>(bins - 1), Math.max(0, Math.floor((hostLog10(r) - lo) / width)));
}

/**
 * density-pdf.ts histogramCells over cells [from, to): volume and mass fractions per bin into sums (bins each),
 * bins found by `edges` (the same bins whatever the first guess). 1/n is the same double as there; r/n is r
 * times it when n is a power of two (then exact: the same double).
 */
export function histogramCells(psi: usize, sums: usize, edges: usize, n: f64, mean: f64, lo: f64, width: f64, bins: i32, margin: f64, from: i32, to: i32): void {
  const perLog2 = (Math.LOG10E * Math.LN2) / width;
  const shift = lo / width;
  const inv = 1 / n;
  const exact = (reinterpret<u64>(n) & 0x000fffffffffffff) == 0;
  for (let i = from; i < to; i++) {
    const q = psi + (<usize>i << 4);
    const re = load<f64>(q);
    const im = load<f64>(q, 8);
    const x = (re * re + im * im) / mean;
    // Math.max(x, 1e-30); a NaN cell has no bin (JavaScript's sums[NaN] is no entry); the guess truncated and
    // clamped (floor or trunc: the same after the clamp)
    if (x != x) continue;
    const r = x < 1e-30 ? 1e-30 : x;
    let b = <i32>(quickLog2(r) * perLog2 - shift);
    b = b < 0 ? 0 : b > bins - 1 ? bins - 1 : b;
    while (b < bins - 1 && r >= f(edges, b + 1)) b++;
    while (r < f(edges, b)) b--;
    if (r < f(edges, b) * (1 + margin) || r >= f(edges, b + 1) * (1 - margin)) b = binOf(r, lo, width, bins);
    addF(sums, b, inv);
    addF(sums, bins + b, exact ? r * inv : r / n);
  }
}

/** Block sums of the density PDF's range pass (density-pdf.ts rangeCells) over cells [from, to): Σρ, the least ρ > 0 and the largest ρ into out[0…2]. */
export function rangeCells(psi: usize, from: i32, to: i32, out: usize): void {
  let sum: f64 = 0;
  let minRho = Infinity;
  let maxRho: f64 = 0;
  for (let i = from; i < to; i++) {
    const q = psi + (<usize>i << 4);
    const re = load<f64>(q);
    const im = load<f64>(q, 8);
    const rho = re * re + im * im;
    sum += rho;
    if (rho > 0 && rho < minRho) minRho = rho;
    if (rho > maxRho) maxRho = rho;
  }
  setF(out, 0, sum);
  setF(out, 1, minRho);
  setF(out, 2, maxRho);
}

/** Σ|ψ|² over cells [from, to) in storage order (energy-split.ts massOf). */
export function massCells(psi: usize, from: i32, to: i32): f64 {
  let mass: f64 = 0;
  for (let i = from; i < to; i++) {
    const re = load<f64>(psi + (<usize>i << 4));
    const im = load<f64>(psi + (<usize>i << 4), 8);
    mass += re * re + im * im;
  }
  return mass;
}

/** spectrum-moments.ts over rows [from, end) of a spectrum: Σ m, Σ k² m, Σ kx m, Σ ky m, Σ kz m with m = |ψ_k|², added into acc[0…4] in storage order. */
export function momentRows(spec: usize, k0: usize, k1: usize, k2: usize, n1: i32, n2: i32, from: i32, end: i32, acc: usize): void {
  let w = f(acc, 0);
  let kk = f(acc, 1);
  let x1 = f(acc, 2);
  let y1 = f(acc, 3);
  let z1 = f(acc, 4);
  for (let r = from; r < end; r++) {
    const kx = f(k0, r / n1);
    const ky = f(k1, r % n1);
    const kab = kx * kx + ky * ky;
    const row = spec + (<usize>(r * n2) << 4);
    for (let c = 0; c < n2; c++) {
      const re = load<f64>(row + (<usize>c << 4));
      const im = load<f64>(row + (<usize>c << 4), 8);
      const m = re * re + im * im;
      const kz = f(k2, c);
      w += m;
      kk += (kab + kz * kz) * m;
      x1 += kx * m;
      y1 += ky * m;
      z1 += kz * m;
    }
  }
  setF(acc, 0, w);
  setF(acc, 1, kk);
  setF(acc, 2, x1);
  setF(acc, 3, y1);
  setF(acc, 4, z1);
}

/**
 * granules.ts contrastPass over cells [0, n): x = |ψ|²/ρ̄ counted in bins of `width` (those below `bins`, into
 * `counts`), δ = x − 1 into the real parts of `data` unless it is 0; returns Σ δ²/n in storage order.
 */
export function contrastCounts(psi: usize, mean: f64, width: f64, counts: usize, bins: i32, data: usize, n: i32): f64 {
  const cells = <f64>n;
  let variance: f64 = 0;
  for (let i = 0; i < n; i++) {
    const q = psi + (<usize>i << 4);
    const re = load<f64>(q);
    const im = load<f64>(q, 8);
    const x = (re * re + im * im) / mean;
    if (data) {
      store<f64>(data + (<usize>i << 4), x - 1);
      store<f64>(data + (<usize>i << 4), 0.0, 8);
    }
    variance += ((x - 1) * (x - 1)) / cells;
    const b = Math.floor(x / width);
    if (b < <f64>bins) addF(counts, <i32>b, 1);
  }
  return variance;
}

/** data ← |data|²/n with imaginary part 0, over cells [0, n) (the power whose inverse transform is ξ). */
export function powerCells(data: usize, n: i32): void {
  const cells = <f64>n;
  for (let i = 0; i < n; i++) {
    const p = data + (<usize>i << 4);
    const re = load<f64>(p);
    const im = load<f64>(p, 8);
    store<f64>(p, (re * re + im * im) / cells);
    store<f64>(p, 0.0, 8);
  }
}

/**
 * granules.ts shellAverage's rows: the real parts of `data` in shells of width h by the minimum-image distance
 * √(rows[r] + last[c]) (rows beyond `limit` skipped), Σ value, Σ r and the count per shell below `bins` into
 * sum, rs, cnt; in storage order.
 */
export function distanceShells(data: usize, rows: usize, last: usize, count: i32, n2: i32, h: f64, limit: f64, sum: usize, rs: usize, cnt: usize, bins: i32): void {
  for (let row = 0; row < count; row++) {
    const rowR2 = f(rows, row);
    if (!(Math.sqrt(rowR2) < limit)) continue;
    const at = data + (<usize>(row * n2) << 4);
    for (let c = 0; c < n2; c++) {
      const r = Math.sqrt(rowR2 + f(last, c));
      const b = Math.floor(r / h + 0.5);
      if (b >= <f64>bins) continue;
      const i = <i32>b;
      addF(sum, i, load<f64>(at + (<usize>c << 4)));
      addF(rs, i, r);
      addF(cnt, i, 1);
    }
  }
}

/** energy-split.ts nyquistEnergy's plane of one axis: sum + Σ k² |spec|² perMode over the modes with index n_axis/2 along `axis`, in storage order. */
export function nyquistPlane(spec: usize, n0: i32, n1: i32, n2: i32, axis: i32, k: f64, perMode: f64, sum: f64): f64 {
  const a0 = axis == 0 ? n0 >> 1 : 0;
  const a1 = axis == 0 ? a0 + 1 : n0;
  const b0 = axis == 1 ? n1 >> 1 : 0;
  const b1 = axis == 1 ? b0 + 1 : n1;
  const c0 = axis == 2 ? n2 >> 1 : 0;
  const c1 = axis == 2 ? c0 + 1 : n2;
  for (let a = a0; a < a1; a++)
    for (let b = b0; b < b1; b++)
      for (let c = c0; c < c1; c++) {
        const p = spec + (<usize>((a * n1 + b) * n2 + c) << 4);
        const re = load<f64>(p);
        const im = load<f64>(p, 8);
        sum += k * k * (re * re + im * im) * perMode;
      }
  return sum;
}

/** ρ = |ψ|² of cells [0, n) into `rho` (peaks.ts densityGrid). */
export function densityCells(psi: usize, rho: usize, n: i32): void {
  for (let i = 0; i < n; i++) {
    const re = load<f64>(psi + (<usize>i << 4));
    const im = load<f64>(psi + (<usize>i << 4), 8);
    setF(rho, i, re * re + im * im);
  }
}

/**
 * peaks.ts peakCandidates over rows [from, n0 n1) of ρ: the cells no neighbour along a simulated axis (periodic)
 * exceeds, in storage order, into the int32 list `out` (its count first) while a whole row still fits within
 * `cap` entries; returns the row to go on from (n0 n1 when done).
 */
export function peakRows(rho: usize, n0: i32, n1: i32, n2: i32, from: i32, out: usize, cap: i32): i32 {
  const s0 = n1 * n2;
  let count = 0;
  let r = from;
  for (; r < n0 * n1 && count + n2 <= cap; r++) {
    const a = r / n1;
    const b = r % n1;
    const up0 = a == n0 - 1 ? -(n0 - 1) * s0 : s0;
    const down0 = a == 0 ? (n0 - 1) * s0 : -s0;
    const up1 = b == n1 - 1 ? -(n1 - 1) * n2 : n2;
    const down1 = b == 0 ? (n1 - 1) * n2 : -n2;
    for (let c = 0, i = r * n2; c < n2; c++, i++) {
      const v = f(rho, i);
      const up2 = c == n2 - 1 ? -(n2 - 1) : 1;
      const down2 = c == 0 ? n2 - 1 : -1;
      if (n2 > 1 && (f(rho, i + up2) > v || f(rho, i + down2) > v)) continue;
      if (n1 > 1 && (f(rho, i + up1) > v || f(rho, i + down1) > v)) continue;
      if (n0 > 1 && (f(rho, i + up0) > v || f(rho, i + down0) > v)) continue;
      store<i32>(out + (<usize>(1 + count) << 2), i);
      count++;
    }
  }
  store<i32>(out, count);
  return r;
}

/**
 * peaks.ts radialProfile's sums: for the cells (A[ia], B[ib], C[ic]) of the index lists (each list: indices,
 * then squared distances, as doubles), r = √(dA + dB + dC) in shells of width h below `bins`: Σρ, Σr and the
 * count into sum, rs, cnt, in the lists' order.
 */
export function radialCells(psi: usize, n1: i32, n2: i32, la: usize, na: i32, lb: usize, nb: i32, lc: usize, nc: i32, h: f64, bins: i32, sum: usize, rs: usize, cnt: usize): void {
  for (let ia = 0; ia < na; ia++)
    for (let ib = 0; ib < nb; ib++) {
      const row = (<i32>f(la, ia) * n1 + <i32>f(lb, ib)) * n2;
      const dab = f(la, na + ia) + f(lb, nb + ib);
      for (let ic = 0; ic < nc; ic++) {
        const r = Math.sqrt(dab + f(lc, nc + ic));
        const bin = Math.floor(r / h + 0.5);
        if (bin >= <f64>bins) continue;
        const i = <i32>bin;
        const p = psi + (<usize>(row + <i32>f(lc, ic)) << 4);
        const re = load<f64>(p);
        const im = load<f64>(p, 8);
        setF(sum, i, f(sum, i) + re * re + im * im);
        addF(rs, i, r);
        addF(cnt, i, 1);
      }
    }
}

/** energies.ts inverseK2Row over rows [from, end) of a spectrum: sum + Σ_{k≠0} |s_k|²/k² in storage order. */
export function inverseK2Rows(spec: usize, k0: usize, k1: usize, k2: usize, n1: i32, n2: i32, from: i32, end: i32, sum: f64): f64 {
  for (let r = from; r < end; r++) {
    const ka = f(k0, r / n1);
    const kb = f(k1, r % n1);
    const kab = ka * ka + kb * kb;
    const row = spec + (<usize>(r * n2) << 4);
    for (let c = 0; c < n2; c++) {
      const kc = f(k2, c);
      const kk = kab + kc * kc;
      if (kk > 0) {
        const re = load<f64>(row + (<usize>c << 4));
        const im = load<f64>(row + (<usize>c << 4), 8);
        sum += (re * re + im * im) / kk;
      }
    }
  }
  return sum;
}
