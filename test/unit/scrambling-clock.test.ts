// The scrambling clock's verdicts on integrals of known form: exponential growth at a constant rate
// (rung exactly where λt = ln N, or projected there), and the growth of neutral directions (∫λ dt = ln(1 + t),
// a perturbation growing linearly in t) or none at all, where it must say "never".
import { describe, expect, it } from "vitest";
import { EXPONENTIAL_GROWTH, scramblingClock } from "../../src/app/scrambling-clock.js";

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
