// The modes of two species sharing one potential against closed forms: two Gaussian modes in a
// periodic 2D box (code units ħ/m = 1, 4πG = 1). A Gaussian density of mass M and width σ has the
// Fourier transform M exp(−k²σ²/2), so the periodic potential energies are lattice sums over the box's
// wave vectors (computed independently):
//   mutual W_12 = −(1/V) Σ_{k≠0} M₁M₂ exp(−k²(σ₁² + σ₂²)/2) cos(k·d)/k²,
//   own    W_ii = −(1/2V) Σ_{k≠0} M_i² exp(−k²σ_i²)/k²,
// and a moving Gaussian ψ = √ρ e^{iq·x} has ∫|∇ψ|² = M(d/(4σ²) + q²) (textbook). The cross coefficient
// of the two-mode Kerr Hamiltonian is ħχ₁₂ = W₁₂/(N₁N₂), each mode's own ħχ_i = 2W_ii/N_i² and
// ħω_i = K_i/N_i with K_i = ħ²/(2m_i²)∫|∇ψ_i|² (the derivation is in species-modes.ts and the README).
// A species' own contact term adds ħχ_SI,i = g_SI,i ∫|φ_i|⁴ (closed form for a Gaussian).
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { PeriodicPoisson } from "../../src/fields/poisson.js";
import { speciesModes } from "../../src/quantum/species-modes.js";

const L = 1;
const grid = new Grid([64, 64], [L, L]);
const V = L * L;
const m = 1e-6; // the first species' particle mass (ħ = m in code units)
const species = [
  { M: 50, sigma: 0.04, c: [0.46, 0.5], q: [2 * Math.PI * 2, 0], mu: 1 },
  { M: 20, sigma: 0.035, c: [0.56, 0.47], q: [0, -2 * Math.PI], mu: 3 },
];

/** ψ = √ρ e^{iq·x} of a 2D Gaussian density of mass M (its periodic images are below 1e-25 of the peak). */
function gaussianField(s: (typeof species)[number]): Float64Array {
  const psi = new Float64Array(2 * grid.size);
  const [n0, n1] = grid.cells as [number, number];
  for (let i = 0; i < n0; i++) {
    for (let j = 0; j < n1; j++) {
      const x = [(i * L) / n0, (j * L) / n1];
      const r2 = (x[0]! - s.c[0]!) ** 2 + (x[1]! - s.c[1]!) ** 2;
      const amp = Math.sqrt((s.M / (2 * Math.PI * s.sigma ** 2)) * Math.exp(-r2 / (2 * s.sigma ** 2)));
      const phase = s.q[0]! * x[0]! + s.q[1]! * x[1]!;
      const p = i * n1 + j;
      psi[2 * p] = amp * Math.cos(phase);
      psi[2 * p + 1] = amp * Math.sin(phase);
    }
  }
  return psi;
}

/** −Σ_{k≠0} f(k²) cos(k·d)/k² over the box's wave vectors, |n| ≤ 48 per axis (the terms beyond are below 1e-30). */
function latticeSum(f: (k2: number) => number, d: readonly number[]): number {
  let sum = 0;
  for (let a = -48; a <= 48; a++) {
    for (let b = -48; b <= 48; b++) {
      if (a === 0 && b === 0) continue;
      const k = [(2 * Math.PI * a) / L, (2 * Math.PI * b) / L];
      const k2 = k[0]! ** 2 + k[1]! ** 2;
      sum -= (f(k2) * Math.cos(k[0]! * d[0]! + k[1]! * d[1]!)) / k2;
    }
  }
  return sum;
}

describe("two Gaussian modes of different particle mass, each with its own contact term", () => {
  // g_i in code units (the term g_i ρ_i of the potential per unit mass; g_SI,i = g_i m_i²): one repulsive, one attractive.
  // A normalised 2D Gaussian |φ|² over the box's depth D = L has ∫|φ|⁴ dV = 1/(4πσ²D) (closed form), so
  // ħχ_SI,i = g_SI,i ∫|φ_i|⁴ = g_i (μ_i m)²/(4πσ_i² L); the gravitational part is unchanged and χ_ij stays gravitational.
  const contacts = [0.3, -0.2];
  const plain = speciesModes(grid, species.map((s) => ({ psi: gaussianField(s), massRatio: s.mu })), 1, m, new PeriodicPoisson(grid));
  const result = speciesModes(grid, species.map((s, i) => ({ psi: gaussianField(s), massRatio: s.mu, contact: contacts[i]! })), 1, m, new PeriodicPoisson(grid));
  it("ħχ_SI,i = g_SI,i ∫|φ_i|⁴ of a Gaussian to 1e-10, beside the unchanged gravitational part; the cross coefficient has no contact part", () => {
    species.forEach((s, i) => {
      const closed = (contacts[i]! * (s.mu * m) ** 2) / (4 * Math.PI * s.sigma ** 2 * L) / m; // ħ = m in code units
      const mode = result.modes[i]!;
      expect(Math.abs(mode.chiContact / closed - 1)).toBeLessThan(1e-10);
      expect(Math.abs((mode.chi - mode.chiContact) / plain.modes[i]!.chi - 1)).toBeLessThan(1e-14);
      expect(plain.modes[i]!.chiContact).toBe(0);
    });
    expect(result.cross[0]!.chi).toBe(plain.cross[0]!.chi);
  });
});

describe("two Gaussian modes of different particle mass", () => {
  const [s1, s2] = species as [(typeof species)[0], (typeof species)[0]];
  const result = speciesModes(grid, species.map((s) => ({ psi: gaussianField(s), massRatio: s.mu })), 1, m, new PeriodicPoisson(grid));
  const N = species.map((s) => s.M / (s.mu * m));

  it("cross coefficient ħχ₁₂ = W₁₂/(N₁N₂) equals the mutual energy of the two Gaussians (lattice sum) to 1e-10", () => {
    const d = [s1.c[0]! - s2.c[0]!, s1.c[1]! - s2.c[1]!];
    const w12 = (s1.M * s2.M * latticeSum((k2) => Math.exp((-k2 * (s1.sigma ** 2 + s2.sigma ** 2)) / 2), d)) / V;
    expect(result.cross).toHaveLength(1);
    const c = result.cross[0]!;
    expect([c.i, c.j]).toEqual([0, 1]);
    expect(w12).toBeLessThan(0);
    expect(Math.abs(c.energy / w12 - 1)).toBeLessThan(1e-10);
    expect(Math.abs(c.chi / (w12 / (N[0]! * N[1]! * m)) - 1)).toBeLessThan(1e-10);
  });

  it("each mode's own χ_i = 2W_ii/(N_i²ħ) from its own potential, and ω_i = K_i/(N_iħ), to 1e-10", () => {
    species.forEach((s, i) => {
      const wii = (0.5 * s.M * s.M * latticeSum((k2) => Math.exp(-k2 * s.sigma ** 2), [0, 0])) / V;
      const kinetic = (s.M * (2 / (4 * s.sigma ** 2) + s.q[0]! ** 2 + s.q[1]! ** 2)) / (2 * s.mu * s.mu);
      const mode = result.modes[i]!;
      expect(Math.abs(mode.particles / N[i]! - 1)).toBeLessThan(1e-12);
      expect(Math.abs(mode.potential / wii - 1)).toBeLessThan(1e-10);
      expect(Math.abs(mode.chi / ((2 * wii) / (N[i]! ** 2 * m)) - 1)).toBeLessThan(1e-10);
      expect(Math.abs(mode.omega / (kinetic / (N[i]! * m)) - 1)).toBeLessThan(1e-10);
    });
  });

  it("the own and mutual energies add up to the potential energy of the summed density (to round-off)", () => {
    const total = new Float64Array(grid.size);
    const fields = species.map(gaussianField);
    for (let p = 0; p < grid.size; p++) for (const f of fields) total[p]! += f[2 * p]! ** 2 + f[2 * p + 1]! ** 2;
    const phi = Float64Array.from(total);
    new PeriodicPoisson(grid).solveInPlace(phi);
    const w = 0.5 * total.reduce((s, r, p) => s + r * phi[p]!, 0) * grid.cellVolume;
    const parts = result.modes[0]!.potential + result.modes[1]!.potential + result.cross[0]!.energy;
    expect(Math.abs(parts / w - 1)).toBeLessThan(1e-12);
  });
});
