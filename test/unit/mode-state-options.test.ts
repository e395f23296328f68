// The flags of the mode's state and rates (psibox estimate, psibox clocks): every bad value is an input error
// naming its flag and what would be valid (the CLI prints it as one line with exit code 2: test/e2e/mode-state.test.ts).
import { describe, expect, it } from "vitest";
import { readModeState } from "../../src/cli/mode-state-options.js";
import { InputError } from "../../src/core/errors.js";

function messageOf(flags: Record<string, string>): string {
  try {
    readModeState(flags, 5.6e10);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as Error).message;
  }
  throw new Error(`no error for ${JSON.stringify(flags)}`);
}

describe("mode state flags", () => {
  it("read the start and the rates (1/s)", () => {
    const s = readModeState({ squeeze: "0.5", squeezeAngle: "3.14", thermal: "2", lossRate: "1/s", dephasingRate: "0" }, 1e6);
    expect(s.start).toEqual({ squeeze: 0.5, squeezeAngle: 3.14, thermal: 2 });
    expect(s.lossRatePerS).toBe(1);
    expect(s.dephasingRatePerS).toBe(0);
  });

  it("reject bad values naming the flag", () => {
    const cases: [Record<string, string>, RegExp][] = [
      [{ squeeze: "-0.2" }, /^--squeeze: must be a finite squeeze parameter r ≥ 0, got "-0\.2"$/],
      [{ squeeze: "Infinity" }, /^--squeeze: /],
      [{ thermal: "NaN" }, /^--thermal: must be a finite number of thermal quanta ≥ 0/],
      [{ thermal: "1e12" }, /^--thermal: the state's fluctuation holds .* more than the mode's N = /],
      [{ lossRate: "3 km" }, /^--loss-rate: "3 km" is not a rate/],
      [{ dephasingRate: "-1/s" }, /^--dephasing-rate: must be a rate ≥ 0/],
      [{ squeezeAngle: "x" }, /^--squeeze-angle: must be a finite angle/],
    ];
    for (const [flags, msg] of cases) {
      const m = messageOf(flags);
      expect(m, JSON.stringify(flags)).toMatch(msg);
      expect(m.split("\n")).toHaveLength(1);
    }
  });
});
