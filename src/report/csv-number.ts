/**
 * A number as `Number.prototype.toPrecision(8)` writes it, written straight
 * into bytes where that can be done exactly and cheaply: the CSV tables'
 * numbers (csv-table.ts). The eight digits are |v| scaled by an exact power
 * of ten into [10⁷, 10⁸) (one rounding, relative error at most 2⁻⁵³, so an
 * absolute error below 1.2e-8) and rounded to the nearest integer; wherever
 * that rounding could go either way (the scaled value within 1e-7 of a half,
 * which includes every exact tie), the exponent estimate misses, the digits
 * round up to 10⁸, or |v| lies outside [1e-15, 1e30) (powers of ten beyond
 * 10²² are not exact doubles), the caller is told to use toPrecision itself.
 * The layout is toPrecision's: plain decimals for exponents −6 … 7,
 * d.ddddddde±x otherwise.
 */

/** 10⁰ … 10²², each an exact double: the scales. */
const POWERS = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));
/** 10⁰ … 10³⁰ and 10⁰ … 10⁻¹⁶ (the nearest doubles): the exponent's estimate, checked by the scaled value's range. */
const UP = Array.from({ length: 31 }, (_, k) => Number(`1e${k}`));
const DOWN = Array.from({ length: 17 }, (_, k) => Number(`1e-${k}`));
/** The two characters of 00 … 99. */
const PAIRS = Uint8Array.from({ length: 200 }, (_, k) => 48 + (k % 2 ? (k >> 1) % 10 : Math.floor((k >> 1) / 10)));

/** The eight digits of the last value, most significant first (scratch: every entry written before it is read). */
const DIGITS = new Uint8Array(8);

/** The four digits of 0 ≤ four < 10⁴ into DIGITS from `at`, two at a time. */
function fourDigits(at: number, four: number): void {
  const a = (four / 100) | 0;
  const b = four - 100 * a;
  DIGITS[at] = PAIRS[2 * a]!;
  DIGITS[at + 1] = PAIRS[2 * a + 1]!;
  DIGITS[at + 2] = PAIRS[2 * b]!;
  DIGITS[at + 3] = PAIRS[2 * b + 1]!;
}

/** Room a value written by writePrecision8 may take: a sign and "0.00000" before eight digits. */
export const PRECISION8_ROOM = 16;

/**
 * Writes v as v.toPrecision(8) does into `bytes` from `at` (which must have PRECISION8_ROOM bytes of room) and
 * returns the end, or returns −1 and writes nothing final where this cannot be sure of the same digits (then
 * use toPrecision). v must not be an integer (CSV writes those with String).
 */
export function writePrecision8(bytes: Uint8Array, at: number, v: number): number {
  const a = v < 0 ? -v : v;
  if (!(a >= 1e-15 && a < 1e30)) return -1; // NaN and ±∞ too
  let e = 0;
  if (a >= 1) while (a >= UP[e + 1]!) e++;
  else for (e = -1; a < DOWN[-e]!; ) e--;
  const m = 7 - e;
  if (m > 22 || m < -22) return -1;
  const s = m >= 0 ? a * POWERS[m]! : a / POWERS[-m]!;
  if (!(s >= 1e7 && s < 1e8)) return -1;
  let n = Math.floor(s);
  const f = s - n; // exact: s < 2⁵³
  if (Math.abs(f - 0.5) <= 1e-7) return -1;
  if (f > 0.5) n++;
  if (n === 1e8) return -1;
  const high = (n / 10000) | 0;
  fourDigits(0, high);
  fourDigits(4, n - 10000 * high);
  if (v < 0) bytes[at++] = 45; // "-"
  if (e < -6 || e > 7) {
    bytes[at++] = DIGITS[0]!;
    bytes[at++] = 46; // "."
    for (let k = 1; k < 8; k++) bytes[at++] = DIGITS[k]!;
    bytes[at++] = 101; // "e"
    bytes[at++] = e < 0 ? 45 : 43;
    const x = e < 0 ? -e : e;
    if (x >= 10) bytes[at++] = 48 + ((x / 10) | 0);
    bytes[at++] = 48 + (x % 10);
  } else if (e >= 0) {
    for (let k = 0; k < 8; k++) {
      if (k === e + 1) bytes[at++] = 46;
      bytes[at++] = DIGITS[k]!;
    }
  } else {
    bytes[at++] = 48;
    bytes[at++] = 46;
    for (let k = -1; k > e; k--) bytes[at++] = 48;
    for (let k = 0; k < 8; k++) bytes[at++] = DIGITS[k]!;
  }
  return at;
}

/** Scratch of precision8. */
const TEXT = new Uint8Array(PRECISION8_ROOM);

/** v.toPrecision(8) of a number that is not an integer. */
export function precision8(v: number): string {
  const end = writePrecision8(TEXT, 0, v);
  if (end < 0) return v.toPrecision(8);
  // all sixteen characters at once, then the ones written (cheaper than a call with a variable count)
  const t = TEXT;
  return String.fromCharCode(t[0]!, t[1]!, t[2]!, t[3]!, t[4]!, t[5]!, t[6]!, t[7]!, t[8]!, t[9]!, t[10]!, t[11]!, t[12]!, t[13]!, t[14]!, t[15]!).slice(0, end);
}
