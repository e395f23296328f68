// Gaussian states built in a truncated Fock basis, in decimal.js arithmetic, by applying the
// operators themselves (no closed-form amplitudes): S(ζ) = exp(½(ζ* b² − ζ b†²)) in its
// normally ordered (disentangled) form exp(−½e^{iθ}tanh r b†²) cosh(r)^{−(n+½)} exp(½e^{−iθ}tanh r b²),
// and D(α) = e^{−|α|²/2} e^{αb†} e^{−α*b} (textbook operator identities, e.g. Barnett & Radmore 1997).
import { Decimal } from "decimal.js";

export type DC = { re: Decimal; im: Decimal };

export function fockKit(digits: number) {
  const D = Decimal.clone({ precision: digits });
  const z = (): DC => ({ re: new D(0), im: new D(0) });
  const mul = (a: DC, b: DC): DC => ({ re: a.re.times(b.re).minus(a.im.times(b.im)), im: a.re.times(b.im).plus(a.im.times(b.re)) });
  const add = (a: DC, b: DC): DC => ({ re: a.re.plus(b.re), im: a.im.plus(b.im) });
  const scale = (a: DC, s: Decimal): DC => ({ re: a.re.times(s), im: a.im.times(s) });
  const conj = (a: DC): DC => ({ re: a.re, im: a.im.neg() });
  const num = (x: number) => new D(x === 0 ? "0" : x.toPrecision(100));
  const cnum = (re: number, im = 0): DC => ({ re: num(re), im: num(im) });

  /** Σ_j t^j/j! (b^p)^j v (p = 1 or 2: lowering, finite) or (b†^p)^j v truncated at M (raising). */
  const roots: Decimal[] = [];
  const root = (n: number): Decimal => (roots[n] ??= D.sqrt(n));
  function series(v: DC[], t: DC, p: number, raising: boolean): DC[] {
    const M = v.length;
    const out = v.map((x) => ({ ...x }));
    let term = v;
    for (let j = 1; ; j++) {
      const next: DC[] = Array.from({ length: M }, z);
      let any = false;
      for (let n = 0; n < M; n++) {
        const src = raising ? n - p : n + p;
        if (src < 0 || src >= M) continue;
        const x = term[src] as DC;
        if (x.re.isZero() && x.im.isZero()) continue;
        // b^p |src> = sqrt(src!/(src−p)!) |src − p>;  b†^p |src> = sqrt((src+p)!/src!) |src + p>
        const hi = raising ? n : src;
        const f = p === 1 ? root(hi) : root(hi).times(root(hi - 1));
        next[n] = scale(mul(x, t), f.div(j));
        any = true;
      }
      if (!any) break;
      term = next;
      let big = new D(0);
      for (let n = 0; n < M; n++) {
        out[n] = add(out[n] as DC, next[n] as DC);
        big = D.max(big, (next[n] as DC).re.abs(), (next[n] as DC).im.abs());
      }
      if (raising && big.lt(new D(10).pow(-digits - 5)) && j > 4) break;
    }
    return out;
  }

  /**
   * The pure state D(α)S(ζ)|0⟩ = S(ζ)|γ⟩, γ = α cosh r + α e^{iθ} sinh r (α real; S†b S = b cosh r − e^{iθ} b† sinh r):
   * the coherent amplitudes of γ, times e^{½e^{−iθ} tanh r γ²} (|γ⟩ is an eigenvector of b²), cosh(r)^{−(n+½)},
   * then the raising series. Avoids the cancellation of the displacement series at large α.
   */
  function squeezedCoherent(alpha: number, r: number, angle: number, M: number): DC[] {
    const a = num(alpha);
    const g: DC = { re: a.times(D.cosh(num(r))).plus(a.times(D.sinh(num(r))).times(D.cos(num(angle)))), im: a.times(D.sinh(num(r))).times(D.sin(num(angle))) };
    const g2 = mul(g, g);
    const t = D.tanh(num(r));
    const e = mul({ re: t.times(D.cos(num(angle))).div(2), im: t.times(D.sin(num(angle))).neg().div(2) }, g2);
    const pre = D.exp(e.re.minus(g.re.pow(2).plus(g.im.pow(2)).div(2)));
    let v: DC[] = [];
    let amp: DC = { re: pre.times(D.cos(e.im)), im: pre.times(D.sin(e.im)) };
    const ch = D.cosh(num(r));
    for (let n = 0; n < M; n++) {
      if (n > 0) amp = scale(mul(amp, g), new D(1).div(root(n)));
      v.push(scale(amp, D.pow(ch, -(n + 0.5))));
    }
    v = series(v, { re: t.times(D.cos(num(angle))).neg().div(2), im: t.times(D.sin(num(angle))).neg().div(2) }, 2, true);
    return v;
  }

  /** D(α)S(r e^{iθ})|k⟩ in a basis of M states (α real). */
  function gaussianState(alpha: number, r: number, angle: number, k: number, M: number): DC[] {
    let v: DC[] = Array.from({ length: M }, z);
    v[k] = { re: new D(1), im: new D(0) };
    const t = D.tanh(num(r));
    const ch = D.cosh(num(r));
    const ca = D.cos(num(angle));
    const sa = D.sin(num(angle));
    v = series(v, { re: t.times(ca).div(2), im: t.times(sa).neg().div(2) }, 2, false);
    v = v.map((x, n) => scale(x, D.pow(ch, -(n + 0.5))));
    v = series(v, { re: t.times(ca).neg().div(2), im: t.times(sa).neg().div(2) }, 2, true);
    const a = num(alpha);
    v = series(v, { re: a.neg(), im: new D(0) }, 1, false);
    v = series(v, { re: a, im: new D(0) }, 1, true);
    const norm = D.exp(a.times(a).neg().div(2));
    return v.map((x) => scale(x, norm));
  }

  /** ⟨n⟩, ⟨b⟩, ⟨b²⟩ of Σ_w w |ψ⟩⟨ψ| after the Kerr phase e^{−iX n(n−1)/2} (Θ = 0). */
  function kerrMoments(components: { weight: number; psi: DC[] }[], X: number) {
    const x = num(X);
    let nSum = new D(0);
    let b1 = z();
    let b2 = z();
    for (const { weight, psi } of components) {
      const w = num(weight);
      const c = psi.map((a, n) => {
        const ph = x.times(-(n * (n - 1)) / 2);
        return mul(a, { re: D.cos(ph), im: D.sin(ph) });
      });
      for (let n = 0; n < c.length; n++) {
        const cn = c[n] as DC;
        nSum = nSum.plus(w.times(n).times(cn.re.pow(2).plus(cn.im.pow(2))));
        if (n + 1 < c.length) b1 = add(b1, scale(mul(conj(cn), c[n + 1] as DC), w.times(D.sqrt(n + 1))));
        if (n + 2 < c.length) b2 = add(b2, scale(mul(conj(cn), c[n + 2] as DC), w.times(D.sqrt((n + 1) * (n + 2)))));
      }
    }
    const b1sq = mul(b1, b1);
    const m = { re: b2.re.minus(b1sq.re), im: b2.im.minus(b1sq.im) };
    const V = new D(0.5).plus(nSum).minus(b1.re.pow(2).plus(b1.im.pow(2))).minus(D.sqrt(m.re.pow(2).plus(m.im.pow(2))));
    return { n: nSum, b1, b2, V };
  }

  const norm2 = (psi: DC[]) => psi.reduce((s, a) => s.plus(a.re.pow(2)).plus(a.im.pow(2)), new D(0));
  return { D, gaussianState, squeezedCoherent, kerrMoments, norm2, cnum };
}
