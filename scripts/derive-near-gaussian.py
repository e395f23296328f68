#!/usr/bin/env python3
"""Series coefficients of src/quantum/near-gaussian.ts (needs sympy).

The covariance determinant of a displaced Gaussian start under the closed Kerr
evolution, det = N(N+1) - (2N+1)|<b>|^2 - |<b^2>|^2 + 2 Re(<b^2> conj(<b>)^2) + 1/4,
from the closed forms of src/quantum/open-kerr.ts, expanded in h = 1/N_a at fixed
y = N_a X. The terms that grow with N_a cancel identically; the script prints, for
each power k of h, the coefficients of y^j as polynomials in n, a = Re m, b = Im m,
one table row [k, j, coefficient] per line, ready to paste into near-gaussian.ts.

Usage: python3 scripts/derive-near-gaussian.py [K]   (K = 2 by default: h^0 .. h^2; about 3 minutes)
"""
import sys
import sympy as sp

K = int(sys.argv[1]) if len(sys.argv) > 1 else 2
ORD = K + 2  # det carries N^2 = h^-2, so the bracket is needed to h^(K+2)
h, y, n, a, b = sp.symbols("h y n a b", real=True)
I = sp.I


def trunc(e, o=ORD):
    e = sp.expand(e)
    return sum(e.coeff(h, k) * h**k for k in range(0, o + 1))


def series(w, coeff, o):
    """sum_k coeff(k) w^k for w = O(h), truncated at h^o."""
    w = trunc(w, o)
    out, term = 0, 1
    for k in range(1, o + 1):
        term = trunc(term * w, o)
        out += coeff(k) * term
    return sp.expand(out)


def exp_series(z, o=ORD):
    z = trunc(z, o)
    z0 = z.coeff(h, 0)
    fact = [1]
    for k in range(1, o + 1):
        fact.append(fact[-1] * k)
    return sp.expand(sp.exp(z0) * (1 + series(z - z0, lambda k: sp.Rational(1, fact[k]), o)))


log1p = lambda w, o=ORD: series(w, lambda k: sp.Rational((-1) ** (k + 1), k), o)
inv1p = lambda w, o=ORD: 1 + series(w, lambda k: (-1) ** k, o)

X = y * h
P = n**2 - a**2 - b**2  # lambda+ lambda-
rho = a - n
mu = (a - n) + I * b  # m - n
m = a + I * b
O2 = ORD + 1  # N_a R(c) needs c to one order more


def expm1_series(t, o):
    out, term = 0, 1
    for k in range(1, o + 2):
        term = trunc(term * t / k, o + 1)
        out += term
    return sp.expand(out)


c1 = expm1_series(-I * X, O2)
c2 = expm1_series(-2 * I * X, O2)
logdet = lambda c: log1p(-2 * n * c + P * c**2)


def NaR(c):
    """N_a c (1 + c(Re m - n)) / det(c): the exponent of the generating function."""
    return sp.expand(trunc(trunc(c * (1 + c * rho), O2) * inv1p(-2 * n * c + P * c**2, O2), O2) / h)


beta1 = trunc(NaR(c1) - sp.Rational(3, 2) * logdet(c1) + log1p(c1 * mu))
pair = sp.expand((1 + c2 * mu) ** 2 + h * m * (1 - 2 * n * c2 + P * c2**2))
beta2 = trunc(-I * X + NaR(c2) - sp.Rational(5, 2) * logdet(c2) + log1p(pair - 1))
conj = lambda e: e.subs(I, -I)
E1 = exp_series(beta1 + conj(beta1))  # |<b>|^2 / N_a
E2 = exp_series(beta2 + conj(beta2))  # |<b^2>|^2 / N_a^2
E3 = exp_series(beta2 + 2 * conj(beta1))  # <b^2> conj(<b>)^2 / N_a^2
# h^2 (det - 1/4), with N = 1/h + n
bracket = trunc((1 + n * h) ** 2 + h * (1 + n * h) - (2 * (1 + n * h) + h) * E1 - E2 + E3 + conj(E3))
for k in range(0, ORD + 1):
    c = sp.expand(bracket.coeff(h, k))
    if k < 2:
        assert c == 0, f"h^{k} should cancel"
        continue
    for (j,), cj in sorted(sp.Poly(c, y).terms()):
        cj = sp.horner(sp.expand(cj), wrt=n) if cj.has(n) else cj
        print(f"[{k - 2}, {j}, {sp.printing.jscode(sp.nsimplify(cj)).replace('Math.pow', 'pow')}],")
