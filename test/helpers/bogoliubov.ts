// The exact Bogoliubov depletion of a uniform self-gravitating condensate, mode pair by mode pair, for the
// depletion tests (the tangent-linear probes and the truncated-Wigner ensemble).
import { G_SI, HBAR_J_S, KG_PER_EV, M_SUN_KG, PC_M } from "../../src/physics/constants.js";

/** Bogoliubov depletion of one mode of a pair: (U/ħγ)² sinh²(γt), or (U/ħω)² sin²(ωt) for a stable pair (ħ = 1 units of the inputs). */
export function pairDepletion(eps: number, u: number, t: number, hbar = 1): number {
  const d = eps * (eps + 2 * u);
  if (d < 0) {
    const g = Math.sqrt(-d) / hbar;
    return (u / (hbar * g)) ** 2 * Math.sinh(g * t) ** 2;
  }
  const w = Math.sqrt(d) / hbar;
  return (u / (hbar * w)) ** 2 * Math.sin(w * t) ** 2;
}

const KPC = 1e3 * PC_M;

/** ħk²/2m and U_k = −4πGmρ̄/k² (J) of the mode k = 2πj/L of a uniform box (SI inputs from astronomical ones). */
export function boxMode(rhoMsunKpc3: number, massEv: number, boxKpc: number, j: number): { eps: number; u: number } {
  const m = massEv * KG_PER_EV;
  const rho = (rhoMsunKpc3 * M_SUN_KG) / KPC ** 3;
  const k = (2 * Math.PI * j) / (boxKpc * KPC);
  return { eps: (HBAR_J_S * HBAR_J_S * k * k) / (2 * m), u: (-4 * Math.PI * G_SI * m * rho) / (k * k) };
}

/** Σ_k n_k(t) over the modes k = 2πj/L, j = −n/2 … n/2 − 1, j ≠ 0, of a uniform box (SI inputs). */
export function boxDepletion(rhoMsunKpc3: number, massEv: number, boxKpc: number, cells: number, tS: number): { total: number; unstable: number; growth: number } {
  let total = 0;
  let unstable = 0;
  let growth = 0;
  for (let j = -cells / 2; j < cells / 2; j++) {
    if (j === 0) continue;
    const { eps, u } = boxMode(rhoMsunKpc3, massEv, boxKpc, j);
    total += pairDepletion(eps, u, tS, HBAR_J_S);
    if (eps * (eps + 2 * u) < 0) unstable++;
    growth = Math.max(growth, Math.sqrt(Math.max(0, -eps * (eps + 2 * u))) / HBAR_J_S);
  }
  return { total, unstable, growth };
}
