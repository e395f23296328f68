/**
 * The stationary spherical Gross–Pitaevskii–Poisson soliton by shooting (computed independently of psibox's
 * grid code): in units ħ = m = 1, 4πG = 1 and contact coefficient g (|ψ|² = ρ),
 *   ψ'' + 2ψ'/r = 2(u + gψ²)ψ,   u'' + 2u'/r = ψ²,   u = Φ − μ,
 * from ψ(0) = ψ₀, u(0) = u₀ with zero slopes; u₀ is found by bisection as the value between the solutions that
 * cross zero (u₀ too low) and those that turn back up (too high), which is the nodeless decaying one. RK4 in r.
 */

/**
 * Mass M = 4π∫ψ²r²dr, radius r₉₉ (enclosing 99% of M), 4π∫ψ⁴r²dr and the eigenvalue μ (per unit mass: Φ → 0 far
 * away, so μ = −u − M/(4πr) where the shot ends, ψ there negligible) of the nodeless soliton of central amplitude ψ₀.
 */
export function shootSoliton(psi0: number, g: number, dr = 0.01, rMax = 400): { mass: number; r99: number; rho2: number; rms: number; mu: number } {
  let lo = -10 * (1 + Math.abs(g)) * psi0 * psi0 - 10;
  let hi = 0;
  let best = { mass: 0, r99: 0, rho2: 0, rms: 0, mu: 0 };
  for (let it = 0; it < 50; it++) {
    const u0 = 0.5 * (lo + hi);
    const r = integrate(psi0, u0, g, dr, rMax);
    if (r.crossed) lo = u0;
    else hi = u0;
    best = r;
  }
  return { mass: best.mass, r99: best.r99, rho2: best.rho2, rms: best.rms, mu: best.mu };
}

function integrate(psi0: number, u0: number, g: number, dr: number, rMax: number): { crossed: boolean; mass: number; r99: number; rho2: number; rms: number; mu: number } {
  // series start at r = dr: ψ ≈ ψ₀ + (u₀ + gψ₀²)ψ₀ r²/3, u ≈ u₀ + ψ₀² r²/6
  let r = dr;
  let y = [psi0 + ((u0 + g * psi0 * psi0) * psi0 * r * r) / 3, (2 * (u0 + g * psi0 * psi0) * psi0 * r) / 3, u0 + (psi0 * psi0 * r * r) / 6, (psi0 * psi0 * r) / 3];
  const f = (x: number, s: number[]) => [s[1]!, -(2 / x) * s[1]! + 2 * (s[2]! + g * s[0]! * s[0]!) * s[0]!, s[3]!, -(2 / x) * s[3]! + s[0]! * s[0]!];
  const shells: [number, number][] = [];
  let mass = (4 * Math.PI * psi0 * psi0 * r ** 3) / 3;
  let rho2 = (4 * Math.PI * psi0 ** 4 * r ** 3) / 3;
  let mr2 = 0;
  while (r < rMax) {
    const k1 = f(r, y);
    const k2 = f(r + dr / 2, y.map((v, i) => v + (dr / 2) * k1[i]!));
    const k3 = f(r + dr / 2, y.map((v, i) => v + (dr / 2) * k2[i]!));
    const k4 = f(r + dr, y.map((v, i) => v + dr * k3[i]!));
    const next = y.map((v, i) => v + (dr / 6) * (k1[i]! + 2 * k2[i]! + 2 * k3[i]! + k4[i]!));
    const dm = 2 * Math.PI * dr * (y[0]! ** 2 * r * r + next[0]! ** 2 * (r + dr) ** 2);
    const dq = 2 * Math.PI * dr * (y[0]! ** 4 * r * r + next[0]! ** 4 * (r + dr) ** 2);
    const dr2 = 2 * Math.PI * dr * (y[0]! ** 2 * r ** 4 + next[0]! ** 2 * (r + dr) ** 4);
    r += dr;
    y = next;
    const mu = -(y[2]! + mass / (4 * Math.PI * r));
    if (y[0]! < 0) return { crossed: true, mass, r99: radius(shells, mass), rho2, rms: Math.sqrt(mr2 / mass), mu };
    if (y[1]! > 0) return { crossed: false, mass, r99: radius(shells, mass), rho2, rms: Math.sqrt(mr2 / mass), mu };
    mass += dm;
    rho2 += dq;
    mr2 += dr2;
    shells.push([r, mass]);
  }
  return { crossed: false, mass, r99: radius(shells, mass), rho2, rms: Math.sqrt(mr2 / mass), mu: -(y[2]! + mass / (4 * Math.PI * r)) };
}

function radius(shells: readonly [number, number][], total: number): number {
  return shells.find(([, m]) => m >= 0.99 * total)?.[0] ?? Number.NaN;
}

/** √⟨r²⟩ (mass-weighted) of the nodeless soliton of central amplitude ψ₀, from its enclosed-mass shells. */
export function rmsRadius(psi0: number, g: number, dr = 0.01, rMax = 400): number {
  const s = shootSoliton(psi0, g, dr, rMax);
  return s.rms;
}

/** The largest mass over ψ₀ of the attractive soliton (g < 0), by golden-section search, with its r₉₉ and ψ₀. */
export function largestSoliton(g: number, lo: number, hi: number, dr = 0.01): { mass: number; r99: number; psi0: number } {
  const phi = (Math.sqrt(5) - 1) / 2;
  let a = lo;
  let b = hi;
  let c = b - phi * (b - a);
  let d = a + phi * (b - a);
  let fc = shootSoliton(c, g, dr).mass;
  let fd = shootSoliton(d, g, dr).mass;
  while (b - a > 1e-4 * (a + b)) {
    if (fc > fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - phi * (b - a);
      fc = shootSoliton(c, g, dr).mass;
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + phi * (b - a);
      fd = shootSoliton(d, g, dr).mass;
    }
  }
  const psi0 = 0.5 * (a + b);
  return { psi0, ...shootSoliton(psi0, g, dr) };
}
