/**
 * The one number formatter of psibox's human-readable output: plots, tables,
 * `psibox inspect`, the report and progress lines all print numbers through
 * it, so that they look the same everywhere.
 *
 * Style: a few significant digits (3 by default) with trailing zeros
 * dropped; plain decimals for 0.001 ≤ |x| < 10⁴ (integers there in full),
 * otherwise scientific notation as `1.32 × 10²²` with Unicode superscripts;
 * a true minus sign (−); NaN as an em dash and infinities as ∞. Machine
 * outputs (CSV, JSON) keep full precision and never go through it; `tidy`
 * only removes binary round-off (19.999999999999996 → 20) from values meant
 * for scripts.
 */

const SUPERSCRIPT: Record<string, string> = { "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹", "-": "⁻" };

/** An integer exponent as Unicode superscript digits: −7 → ⁻⁷. */
export function superscript(n: number): string {
  return String(Math.trunc(n))
    .split("")
    .map((c) => SUPERSCRIPT[c] ?? c)
    .join("");
}

/** Drop trailing zeros of a plain decimal string (1.500 → 1.5, 2.000 → 2). */
function trimZeros(s: string): string {
  return s.includes(".") ? s.replace(/0+$/, "").replace(/\.$/, "") : s;
}

/** Decimal exponent and mantissa of |x| rounded to `digits` significant digits. */
function decompose(x: number, digits: number): { mantissa: string; exponent: number } {
  const [m, e] = Math.abs(x).toExponential(digits - 1).split("e");
  return { mantissa: trimZeros(m!), exponent: Number(e) };
}

/** Format a number for people: `digits` significant digits (default 3), scientific outside [10⁻³, 10⁴). */
export function formatNumber(x: number, digits = 3): string {
  if (Number.isNaN(x)) return "—";
  if (!Number.isFinite(x)) return x > 0 ? "∞" : "−∞";
  if (x === 0) return "0";
  const sign = x < 0 ? "−" : "";
  const { mantissa, exponent } = decompose(x, digits);
  if (exponent >= -3 && exponent < 4) {
    // plain decimals; integers from 10^(digits−1) up keep all their digits
    const plain = exponent >= digits - 1 ? String(Math.round(Math.abs(x))) : trimZeros(Math.abs(x).toFixed(digits - 1 - exponent));
    return sign + plain;
  }
  return `${sign}${mantissa} × 10${superscript(exponent)}`;
}

/** A number and its unit: `1.32 × 10²² Msun (km/s)²`; the unit is left off for NaN. */
export function formatQuantity(x: number, unit: string, digits = 3): string {
  if (Number.isNaN(x)) return "—";
  return unit ? `${formatNumber(x, digits)} ${unit}` : formatNumber(x, digits);
}

/** An axis tick: powers of ten as `10⁻⁷`, everything else as formatNumber with up to 4 digits. */
export function formatTick(x: number): string {
  if (x !== 0 && Number.isFinite(x)) {
    const e = Math.round(Math.log10(Math.abs(x)));
    if (Math.abs(Math.abs(x) / 10 ** e - 1) < 1e-9 && (e < -3 || e >= 4)) return `${x < 0 ? "−" : ""}10${superscript(e)}`;
  }
  return formatNumber(x, 4);
}

/** A wall-clock duration for progress lines: `45 s`, `3 min 20 s`, `2 h 05 min`. */
export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return "—";
  if (seconds < 10) return `${trimZeros(seconds.toFixed(1))} s`;
  const s = Math.round(seconds);
  if (s < 60) return `${s} s`;
  if (s < 3600) return `${Math.floor(s / 60)} min ${String(s % 60).padStart(2, "0")} s`;
  const m = Math.round(s / 60);
  return `${Math.floor(m / 60)} h ${String(m % 60).padStart(2, "0")} min`;
}

/** The power of ten that brings the largest |value| into [1, 1000): for axes titled `[10¹² Msun …]`. */
export function axisExponent(values: Iterable<number>): number {
  let max = 0;
  for (const v of values) if (Number.isFinite(v)) max = Math.max(max, Math.abs(v));
  if (max === 0) return 0;
  const e = Math.floor(Math.log10(max));
  return e >= -2 && e < 4 ? 0 : 3 * Math.floor(e / 3);
}

/** A unit with a power-of-ten factor in front: (12, "Msun") → `10¹² Msun`; (0, u) → u. */
export function scaledUnit(exponent: number, unit: string): string {
  if (exponent === 0) return unit;
  return unit ? `10${superscript(exponent)} ${unit}` : `10${superscript(exponent)}`;
}

/** Remove binary round-off from a value meant for scripts (12 significant digits): 19.999999999999996 → 20. */
export function tidy(x: number): number {
  return Number.isFinite(x) && x !== 0 ? Number(x.toPrecision(12)) : x;
}

/** `tidy` applied to every number inside a JSON-like value. */
export function tidyDeep<T>(value: T): T {
  if (typeof value === "number") return tidy(value) as T;
  if (Array.isArray(value)) return value.map((v) => tidyDeep(v)) as T;
  if (value && typeof value === "object") return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, tidyDeep(v)])) as T;
  return value;
}
