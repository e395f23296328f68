/**
 * Complex arithmetic over an abstract real number type, so that one set of
 * formulas serves both double precision and arbitrary precision (decimal.js).
 * Only what the Kerr closed forms need: field operations, exp/expm1/log1p,
 * sin/cos/atan2 and the complex functions built on them.
 */
import { Decimal } from "decimal.js";

/** A real number system. */
export interface Real<T> {
  of(x: number): T;
  add(a: T, b: T): T;
  sub(a: T, b: T): T;
  mul(a: T, b: T): T;
  div(a: T, b: T): T;
  exp(a: T): T;
  expm1(a: T): T;
  log1p(a: T): T;
  ln(a: T): T;
  sin(a: T): T;
  cos(a: T): T;
  atan2(y: T, x: T): T;
  sqrt(a: T): T;
  num(a: T): number;
}

/** IEEE doubles. */
export const DOUBLE: Real<number> = {
  of: (x) => x,
  add: (a, b) => a + b,
  sub: (a, b) => a - b,
  mul: (a, b) => a * b,
  div: (a, b) => a / b,
  exp: Math.exp,
  expm1: Math.expm1,
  log1p: Math.log1p,
  ln: Math.log,
  sin: Math.sin,
  cos: Math.cos,
  atan2: Math.atan2,
  sqrt: Math.sqrt,
  num: (a) => a,
};

/**
 * decimal.js numbers with `digits` significant digits. Doubles enter with
 * their exact binary value to 100 digits (toPrecision), not their shortest
 * decimal form.
 */
export function decimalReal(digits: number): Real<Decimal> {
  const cached = decimalCache.get(digits);
  if (cached) return cached;
  const made = makeDecimalReal(digits);
  decimalCache.set(digits, made);
  return made;
}

const decimalCache = new Map<number, Real<Decimal>>();

function makeDecimalReal(digits: number): Real<Decimal> {
  const D = Decimal.clone({ precision: digits, toExpNeg: -9e15, toExpPos: 9e15 });
  const one = new D(1);
  // e^x for |x| > 1e5 is below 10^{-43429} or above 10^{43429}: 0 or Infinity here (decimal.js
  // would spend minutes on such exponents, and nothing psibox sums can resolve them)
  const exp = (a: Decimal): Decimal => (a.lt(-1e5) ? new D(0) : a.gt(1e5) ? new D(Infinity) : D.exp(a));
  return {
    of: (x) => (Number.isFinite(x) ? new D(x === 0 ? "0" : x.toPrecision(100)) : new D(x)),
    add: (a, b) => a.plus(b),
    sub: (a, b) => a.minus(b),
    mul: (a, b) => a.times(b),
    div: (a, b) => a.div(b),
    exp,
    expm1: (a) => exp(a).minus(one),
    log1p: (a) => D.ln(one.plus(a)),
    ln: (a) => D.ln(a),
    sin: (a) => D.sin(a),
    cos: (a) => D.cos(a),
    atan2: (y, x) => D.atan2(y, x),
    sqrt: (a) => D.sqrt(a),
    num: (a) => a.toNumber(),
  };
}

/** A complex number over T. */
export interface Cx<T> {
  readonly re: T;
  readonly im: T;
}

/** Complex operations over a real system. */
export function complexOps<T>(R: Real<T>) {
  const zero = R.of(0);
  const c = (re: T, im: T = zero): Cx<T> => ({ re, im });
  const add = (a: Cx<T>, b: Cx<T>): Cx<T> => c(R.add(a.re, b.re), R.add(a.im, b.im));
  const sub = (a: Cx<T>, b: Cx<T>): Cx<T> => c(R.sub(a.re, b.re), R.sub(a.im, b.im));
  const mul = (a: Cx<T>, b: Cx<T>): Cx<T> => c(R.sub(R.mul(a.re, b.re), R.mul(a.im, b.im)), R.add(R.mul(a.re, b.im), R.mul(a.im, b.re)));
  const scale = (a: Cx<T>, s: T): Cx<T> => c(R.mul(a.re, s), R.mul(a.im, s));
  const abs2 = (a: Cx<T>): T => R.add(R.mul(a.re, a.re), R.mul(a.im, a.im));
  const div = (a: Cx<T>, b: Cx<T>): Cx<T> => {
    const d = abs2(b);
    return c(R.div(R.add(R.mul(a.re, b.re), R.mul(a.im, b.im)), d), R.div(R.sub(R.mul(a.im, b.re), R.mul(a.re, b.im)), d));
  };
  const exp = (a: Cx<T>): Cx<T> => {
    const e = R.exp(a.re);
    return c(R.mul(e, R.cos(a.im)), R.mul(e, R.sin(a.im)));
  };
  /** e^z − 1 without cancellation for small z. */
  const expm1 = (a: Cx<T>): Cx<T> => {
    const s = R.sin(R.div(a.im, R.of(2)));
    return c(R.sub(R.mul(R.expm1(a.re), R.cos(a.im)), R.mul(R.of(2), R.mul(s, s))), R.mul(R.exp(a.re), R.sin(a.im)));
  };
  /** Principal ln(1 + z) without cancellation for small z. */
  const log1p = (a: Cx<T>): Cx<T> => {
    const t = R.add(R.mul(R.of(2), a.re), abs2(a));
    return c(R.div(R.log1p(t), R.of(2)), R.atan2(a.im, R.add(R.of(1), a.re)));
  };
  /** Principal ln z. */
  const ln = (a: Cx<T>): Cx<T> => c(R.div(R.ln(abs2(a)), R.of(2)), R.atan2(a.im, a.re));
  const abs = (a: Cx<T>): T => R.sqrt(abs2(a));
  return { c, add, sub, mul, scale, div, exp, expm1, log1p, ln, abs, abs2 };
}
