/**
 * A tabulated spectrum (from a user's table): k [1/Mpc] strictly increasing
 * and positive values, either P(k) of cold matter at z = 0 [Mpc³] or the
 * transfer function T(k), interpolated linearly in log k and log value.
 */
export interface TabulatedSpectrum {
  readonly quantity: "power" | "transfer";
  readonly k: Float64Array;
  readonly values: Float64Array;
}

/** Log–log interpolation at k; outside the table the end values (callers check the range). */
export function interpolateTable(t: TabulatedSpectrum, k: number): number {
  const n = t.k.length;
  let lo = 0;
  let hi = n - 1;
  if (k <= t.k[0]!) return t.values[0]!;
  if (k >= t.k[hi]!) return t.values[hi]!;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (t.k[mid]! <= k) lo = mid;
    else hi = mid;
  }
  const f = Math.log(k / t.k[lo]!) / Math.log(t.k[hi]! / t.k[lo]!);
  return Math.exp((1 - f) * Math.log(t.values[lo]!) + f * Math.log(t.values[hi]!));
}
