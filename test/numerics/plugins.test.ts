// Run plug-ins through the run loop: the facts they are given, their columns and summary keys, their
// versioned state in checkpoints (a stopped and resumed run equals an uninterrupted one bit for bit),
// and one-line errors for plug-ins that cannot work.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadConfig } from "../../src/config/load.js";
import { resolveRun, type ResolvedRun } from "../../src/config/resolve.js";
import { prepareOutputDir, simulate, type RunSummary } from "../../src/simulation/run.js";
import type { RunPlugin, StepFacts } from "../../src/simulation/plugin.js";
import { InputError } from "../../src/core/errors.js";
import { makeWork, readCsv, removeWork, writeIn } from "../helpers/cli.js";
import { FREE_PACKET_1D, PLANE_WAVE_2D } from "../helpers/configs.js";

const CONFIG = `${PLANE_WAVE_2D}
[output]
time_unit = "Myr"
checkpoint_every = 7
[sidecar]
enabled = false
`;

const PACKET = `${FREE_PACKET_1D}
[output]
dir = "packet"
[sidecar]
enabled = false
`;

/** A plug-in that keeps running sums of the step facts as its state. */
function summing(version = 1): RunPlugin & { sums: { steps: number; dt: number; drift: number; kick: number; kinetic: number } } {
  const sums = { steps: 0, dt: 0, drift: 0, kick: 0, kinetic: 0 };
  return {
    name: "sums",
    stateVersion: version,
    measures: ["kinetic"],
    columns: ["sum_dt_code", "sum_kinetic_code"],
    sums,
    afterStep(f: StepFacts) {
      sums.steps++;
      sums.dt += f.dt;
      sums.drift += f.drift;
      sums.kick += f.kick;
      sums.kinetic += f.sums.kinetic!;
      expect(f.sums.moments).toBeUndefined(); // only what it asked for
    },
    output: (f) => (f.kind === "row" ? [sums.dt, sums.kinetic] : undefined),
    stop: () => ({ sums_steps: sums.steps }),
    save: () => ({ ...sums }),
    restore: (s) => Object.assign(sums, s as typeof sums),
  };
}

let work: string;
let run: ResolvedRun;
const inFolder = (name: string): ResolvedRun => ({ ...run, outputDir: path.join(work, name) });
async function fresh(name: string, plugins: RunPlugin[], stopAt?: () => boolean): Promise<RunSummary> {
  prepareOutputDir(inFolder(name).outputDir, true);
  return simulate(inFolder(name), { plugins, ...(stopAt ? { stopRequested: () => (stopAt() ? "stopped by the test" : undefined) } : {}) });
}

beforeAll(() => {
  work = makeWork("plugins");
  run = resolveRun(loadConfig(writeIn(work, "w.toml", CONFIG)), "w", work);
});
afterAll(() => removeWork(work));

describe("run plug-ins", () => {
  it("get the step facts: in a static box Σdt = ΣD = ΣK = the duration (exact factors of a = 1)", async () => {
    const p = summing();
    const summary = await fresh("facts", [p]);
    expect(summary.status).toBe("completed");
    expect(summary["sums_steps"]).toBe(summary.steps);
    const duration = run.span.endTime - run.span.startTime;
    expect(p.sums.dt).toBeCloseTo(duration, 12);
    expect(p.sums.drift).toBe(p.sums.dt);
    expect(p.sums.kick).toBe(p.sums.dt);
    const rows = readCsv(path.join(work, "facts/timeseries.csv"));
    expect(Object.keys(rows[0]!).slice(-2)).toEqual(["sum_dt_code", "sum_kinetic_code"]);
  });

  it("get the kinetic sum they ask for: ½∫|∇ψ|² of a free packet is M(1/(8σ²) + v²/2) at the start (analytic) and the same at every step (free evolution conserves it)", async () => {
    const packet = resolveRun(loadConfig(writeIn(work, "p.toml", PACKET)), "p", work);
    if (packet.initial.kind !== "gaussian-packet") throw new Error("not a packet");
    const { width: sigma, velocity } = packet.initial;
    let start = NaN;
    let mass = NaN;
    let worst = 0;
    let steps = 0;
    const kinetic: RunPlugin = {
      name: "kinetic",
      measures: ["kinetic"],
      start: (_c, f) => ((start = f.sums.kinetic!), (mass = f.mass0)),
      afterStep: (f) => {
        worst = Math.max(worst, Math.abs(f.sums.kinetic! / start - 1));
        steps++;
      },
    };
    prepareOutputDir(packet.outputDir, true);
    await simulate(packet, { plugins: [kinetic] });
    expect(steps).toBeGreaterThan(10);
    expect(Math.abs(start / (mass * (1 / (8 * sigma * sigma) + velocity[0]! ** 2 / 2)) - 1)).toBeLessThan(1e-10);
    expect(worst).toBeLessThan(1e-12);
  });

  it("a stopped run resumed with its plug-in's saved state ends bit for bit like an uninterrupted one", async () => {
    const whole = summing();
    await fresh("whole", [whole]);
    const first = summing();
    const stopped = await fresh("cut", [first], () => first.sums.steps >= 7);
    expect(stopped.status).toBe("stopped");
    expect(stopped.steps).toBe(7);
    const second = summing();
    const resumed = await simulate(inFolder("cut"), { plugins: [second], resume: true });
    expect(resumed.status).toBe("completed");
    expect(second.sums).toEqual(whole.sums); // toEqual on numbers is Object.is: bitwise
    expect(fs.readFileSync(path.join(work, "cut/timeseries.csv"), "utf8")).toBe(fs.readFileSync(path.join(work, "whole/timeseries.csv"), "utf8"));
  });

  it("refuses a checkpoint of another state version, or without the plug-in's state, in one line", async () => {
    await expect(simulate(inFolder("cut"), { plugins: [summing(2)], resume: true })).rejects.toThrow(
      /checkpoint\.h5: the plug-in "sums" saved state version 1, this one reads version 2; start the run afresh$/,
    );
    const other = { ...summing(), name: "other" };
    await expect(simulate(inFolder("cut"), { plugins: [other], resume: true })).rejects.toThrow(/has no state for the plug-in "other"/);
  });

  it("refuses plug-ins that cannot work, with one-line errors", async () => {
    const bad = async (plugins: RunPlugin[]) => {
      const e = await fresh("bad", plugins).catch((x: unknown) => x);
      expect(e).toBeInstanceOf(InputError);
      expect((e as Error).message).not.toMatch(/\n/);
      return (e as Error).message;
    };
    expect(await bad([{ name: "a" }, { name: "a" }])).toMatch(/"a" is given twice/);
    expect(await bad([{ name: "no spaces" }])).toMatch(/a name is a letter/);
    expect(await bad([{ name: "s", save: () => 1, restore: () => {} }])).toMatch(/needs a stateVersion/);
    expect(await bad([{ name: "c", columns: ["mass_Msun"] }])).toMatch(/column "mass_Msun" is declared twice/);
    expect(await bad([{ name: "r", columns: ["x", "y"], output: () => [1] }])).toMatch(/gave 1 values for its 2 time-series columns/);
    expect(await bad([{ name: "k", stop: () => ({ steps: 3 }) }])).toMatch(/summary\.json already has a key "steps"/);
  });
});
