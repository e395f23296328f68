// The flow-resolution check: which phase steps between neighbouring cells it flags, that it weights by
// mass, and that a run warns exactly when a packet moves faster than 3/4 of the grid's speed limit
// v_max = π ħ / (m Δx) (the limit computed independently here from CODATA constants).
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { flowResolution, UNRESOLVED_PHASE_STEP } from "../../src/diagnostics/flow-resolution.js";
import { makeWork, readJson, removeWork, runPsibox, writeIn } from "../helpers/cli.js";
import { FREE_PACKET_1D } from "../helpers/configs.js";

/** ψ = e^{i 2π mode·i/n} on a grid of n cells per axis (a plane wave with a phase step 2π·mode/n per cell). */
function planeWave(dims: number, n: number, mode: readonly number[]): { grid: Grid; psi: Float64Array } {
  const grid = new Grid(Array(dims).fill(n), Array(dims).fill(1));
  const psi = new Float64Array(2 * grid.size);
  for (let p = 0; p < grid.size; p++) {
    const idx = [Math.floor(p / (n * n)) % n, Math.floor(p / n) % n, p % n].slice(3 - dims);
    const phase = idx.reduce((s, i, ax) => s + (2 * Math.PI * mode[ax]! * i) / n, 0);
    psi[2 * p] = Math.cos(phase);
    psi[2 * p + 1] = Math.sin(phase);
  }
  return { grid, psi };
}

describe("flow resolution of a field", () => {
  it("flags a plane wave exactly when its phase step per cell exceeds 3π/4, in 1D, 2D and 3D", () => {
    // 2π·11/32 = 2.160 rad < 3π/4 = 2.356 rad < 2π·13/32 = 2.553 rad
    for (const dims of [1, 2, 3]) {
      const slow = planeWave(dims, 32, [11, 3, 5].slice(0, dims));
      const fast = planeWave(dims, 32, [3, 5, 13].slice(3 - dims));
      const s = flowResolution(slow.grid, slow.psi);
      expect(s.unresolvedMassFraction).toBe(0);
      expect(s.largestDenseStep).toBeCloseTo((2 * Math.PI * 11) / 32, 12);
      expect(flowResolution(fast.grid, fast.psi).unresolvedMassFraction).toBeCloseTo(1, 14);
    }
    expect(UNRESOLVED_PHASE_STEP).toBe((3 * Math.PI) / 4);
  });

  it("weights by mass: a fast flow in a thin region counts by the mass it holds", () => {
    // cells 0-31: ρ = 1 at rest; cells 32-63: ρ = 0.01 with a phase step of 2.5 rad per cell. The links
    // 32→33 … 62→63 are flagged; 31→32 (0 → 0) and 63→0 (77.5 rad ≡ 2.10 rad → 0) are not.
    const grid = new Grid([64], [1]);
    const psi = new Float64Array(128);
    for (let i = 0; i < 64; i++) {
      const amp = i < 32 ? 1 : 0.1;
      const phase = i < 32 ? 0 : 2.5 * (i - 32);
      psi[2 * i] = amp * Math.cos(phase);
      psi[2 * i + 1] = amp * Math.sin(phase);
    }
    expect(flowResolution(grid, psi).unresolvedMassFraction).toBeCloseTo((31 * 0.01) / (32 + 32 * 0.01), 14);
  });
});

describe("the run's flow-resolution warning", () => {
  let work: string;
  beforeAll(() => {
    work = makeWork("flow");
  });
  afterAll(() => removeWork(work));

  // v_max = π ħ / (m Δx) for m = 1e-22 eV and Δx = 20 kpc / 256 (CODATA 2018, IAU 2015 parsec)
  const HBAR = 1.054571817e-34;
  const EV_KG = 1.602176634e-19 / 299792458 ** 2;
  const KPC_M = 3.0856775814913673e19;
  const vMaxKmS = (Math.PI * HBAR) / (1e-22 * EV_KG * ((20 * KPC_M) / 256)) / 1e3;

  function packetRun(name: string, fraction: number) {
    const text = FREE_PACKET_1D.replace('"30 km/s"', `"${(fraction * vMaxKmS).toFixed(3)} km/s"`).replace('"10 Myr"', '"0.5 Myr"') + `\n[output]\ndir = "${name}"\n[sidecar]\nenabled = false\n`;
    const ran = runPsibox(work, ["run", writeIn(work, `${name}.toml`, text), "--threads", "1"]);
    expect(ran.code).toBe(0);
    return { ran, summary: readJson<{ flow_resolution: Record<string, number | boolean> }>(path.join(work, name, "summary.json")) };
  }

  it("a packet at 0.7 v_max is resolved; at 0.85 v_max the run warns once and summary.json says so", () => {
    expect(vMaxKmS).toBeGreaterThan(770);
    expect(vMaxKmS).toBeLessThan(772);
    const slow = packetRun("slow", 0.7);
    expect(slow.ran.stderr).not.toMatch(/flow not resolved/);
    expect(slow.summary.flow_resolution.resolved).toBe(true);
    expect(slow.summary.flow_resolution.worst_unresolved_mass_fraction as number).toBeLessThan(1e-12); // the packet's far tails only
    expect(slow.summary.flow_resolution.fastest_flow_km_s as number).toBeCloseTo(vMaxKmS, 6);

    const fast = packetRun("fast", 0.85);
    const warnings = fast.ran.stderr.split("\n").filter((l) => l.includes("flow not resolved"));
    expect(warnings).toHaveLength(1);
    expect(warnings[0]).toMatch(/^warning: flow not resolved at t = 0 Myr: 100% of the mass moves faster than 578 km\/s, near the fastest flow these cells carry \(771 km\/s\)/);
    expect(fast.summary.flow_resolution.resolved).toBe(false);
    expect(fast.summary.flow_resolution.worst_unresolved_mass_fraction as number).toBeGreaterThan(0.999);
    expect(fs.readFileSync(path.join(work, "fast", "run.log"), "utf8")).toMatch(/warning: flow not resolved/);
  });
});
