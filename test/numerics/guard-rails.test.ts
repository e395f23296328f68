// The run loop's guard hook: a check that trips after a step undoes that step, so the stepper holds
// exactly the state of the last accepted step (compared bitwise with an independent run of that many
// steps), and the run stops with the reason.
import { describe, expect, it } from "vitest";
import { Grid } from "../../src/grid/grid.js";
import { makePoissonSolver } from "../../src/fields/poisson.js";
import { StaticBackground } from "../../src/physics/cosmology/background.js";
import { SplitStepper } from "../../src/integrators/split-step.js";
import { evolve } from "../../src/simulation/evolve.js";

function stepper(): SplitStepper {
  const grid = new Grid([32], [1]);
  const s = new SplitStepper(grid, new StaticBackground(), makePoissonSolver(grid, "periodic"));
  const psi = new Float64Array(64);
  for (let i = 0; i < 32; i++) {
    const x = i / 32;
    psi[2 * i] = Math.sqrt(100 * (1 + 0.3 * Math.cos(2 * Math.PI * x)));
    psi[2 * i + 1] = 0;
  }
  s.setState(psi, 0);
  return s;
}
const bytes = (a: Float64Array) => Buffer.from(Float64Array.from(a).buffer);
const rules = { safety: 0.25, maxDlnA: 0.01, fixedStep: 1e-4 };

describe("guard hook of the run loop", () => {
  it("undoes the step that trips it and keeps the last good state bit for bit", () => {
    const tripped = stepper();
    let calls = 0;
    const result = evolve(tripped, rules, { endTime: 1, massTolerance: 1e-8, maxSteps: 100 }, { guard: () => (++calls === 4 ? "the potential is not finite" : undefined) });
    // the guard runs once at the start, then after each step: its 4th call follows step 3
    expect(result).toEqual({ status: "stopped", reason: expect.stringMatching(/^step 3 at t = .*: the potential is not finite; the last good state is kept$/), steps: 2 });
    const reference = stepper();
    expect(evolve(reference, rules, { endTime: 1, massTolerance: 1e-8, maxSteps: 2 }).steps).toBe(2);
    expect(bytes(tripped.psi).equals(bytes(reference.psi))).toBe(true);
    expect(tripped.time).toBe(reference.time);
  });

  it("runs a span far below one code time unit and lands on its end", () => {
    // a span of 1e-14 code times (1e-10 of the fixed step): one step of exactly that length
    const s = stepper();
    const result = evolve(s, rules, { endTime: 1e-14, massTolerance: 1e-8, maxSteps: 100 });
    expect(result.steps).toBe(1);
    expect(s.time).toBe(1e-14);
  });

  it("stops before the first step when the starting field fails the guard", () => {
    const s = stepper();
    const before = Float64Array.from(s.psi);
    const result = evolve(s, rules, { endTime: 1, massTolerance: 1e-8, maxSteps: 100 }, { guard: () => "the density is not finite" });
    expect(result).toEqual({ status: "stopped", reason: "at the start (step 0, t = 0.00000): the density is not finite", steps: 0 });
    expect(bytes(s.psi).equals(bytes(before))).toBe(true);
  });
});
