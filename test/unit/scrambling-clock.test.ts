// The scrambling clock's verdicts on integrals of known form: exponential growth at a constant rate
// (rung exactly where λt = ln N, or projected there), and the growth of neutral directions (∫λ dt = ln(1 + t),
// a perturbation growing linearly in t) or none at all, where it must say "never"; the depletion clock on
// exponential, secular (t²) and oscillating depletions (analytic forms, computed independently here).
import { describe, expect, it } from "vitest";
import { EXPONENTIAL_GROWTH, rateClock, scramblingClock } from "../../src/app/scrambling-clock.js";
import { DEPLETION_GROWTH, depletionClock } from "../../src/app/depletion-clock.js";

const times = Array.from({ length: 41 }, (_, i) => 100 + 0.25 * i); // a run from t = 100 to 110
const since = (f: (s: number) => number) => times.map((t) => f(t - 100));

describe("scrambling clock", () => {
  it("rings where ∫λ dt = λt reaches ln N (linear interpolation is exact for a constant rate)", () => {
    const v = scramblingClock(times, since((s) => 2 * s), 7.3);
    expect(v.verdict).toBe("rang");
    expect(v.time).toBeCloseTo(3.65, 12);
  });

  it("projects beyond the run at the second half's rate", () => {
    const v = scramblingClock(times, since((s) => 1 + 2 * s), 60);
    expect(v.verdict).toBe("projected");
    expect(v.rate).toBeCloseTo(2, 12);
    expect(v.time).toBeCloseTo(29.5, 10);
  });

  it("says never for growth along neutral directions (ln(1 + t)) and for no growth", () => {
    const neutral = since((s) => Math.log(1 + s));
    expect(neutral[40]! - neutral[20]!).toBeLessThan(EXPONENTIAL_GROWTH); // ln(11/6) = 0.61
    expect(scramblingClock(times, neutral, 100).verdict).toBe("never");
    const none = scramblingClock(times, since(() => 0), 100);
    expect(none.verdict).toBe("never");
    expect(none.time).toBeNull();
    expect(scramblingClock([0], [0], 10).verdict).toBe("never");
  });
});

describe("depletion clock (measured N_dep reaching a fraction of N)", () => {
  // N_dep = n0 e^{2γs}: exponential growth, as the depletion of an unstable mode pair grows (sinh² → e^{2γt}/4)
  const grow = since((s) => 1e-3 * Math.exp(2 * 0.8 * s));

  it("rings where N_dep = e^{2γs} reaches the target (interpolation in ln N_dep is exact for it)", () => {
    const v = depletionClock(times, grow, 2.5);
    expect(v.verdict).toBe("rang");
    expect(v.time).toBeCloseTo(Math.log(2.5 / 1e-3) / 1.6, 12);
  });

  it("projects beyond the run at the growth rate of ln N_dep over its second half", () => {
    const v = depletionClock(times, grow, 1e40);
    expect(v.verdict).toBe("projected");
    expect(v.rate).toBeCloseTo(1.6, 12);
    expect(v.time).toBeCloseTo(Math.log(1e40 / 1e-3) / 1.6, 9);
  });

  it("says never for secular growth (∝ s², a factor 4 over the second half), oscillation and round-off", () => {
    expect(depletionClock(times, since((s) => 0.3 * s * s), 1e30).verdict).toBe("never");
    expect(depletionClock(times, since((s) => 0.5 * Math.sin(1.3 * s) ** 2), 1e30).verdict).toBe("never");
    const roundOff = depletionClock(times, since((s) => 1e-30 * Math.exp(2 * s)), 1e30);
    expect(roundOff.verdict).toBe("never");
    expect(roundOff.method).toMatch(/stayed below/);
    expect(DEPLETION_GROWTH).toBeCloseTo(2 * EXPONENTIAL_GROWTH, 15);
  });
});

describe("the rate's depletion time (∫λ dt = ½ ln N) comes at half the scrambling time for a constant rate", () => {
  it("rings at ½ ln N / λ where the scrambling clock rings at ln N / λ", () => {
    const integral = since((s) => 2 * s);
    const half = rateClock(times, integral, 7.3 / 2, "∫λ dt = ½ ln N");
    expect(half.time! / scramblingClock(times, integral, 7.3).time!).toBeCloseTo(0.5, 12);
  });
});
