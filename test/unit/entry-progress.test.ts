// What a local sweep shows of an entry's run: the run's own progress lines (as psibox run writes them when its
// stderr is not a terminal) once the entry has run a while, its warnings at once, and its last error as the
// reason of a failure. The stderr text below is the run's format, cut into chunks at arbitrary places.
import { describe, expect, it } from "vitest";
import { EntryProgress } from "../../src/batch/entry-progress.js";

const RUN_STDERR = `psibox run "mass=1e-22eV"
├─ grid         2D, 256×256 cells, box 20 kpc, gravity periodic
evolving
    0% step 1, t = 0.0495 Myr, dt = 0.0495 Myr (kinetic)
   10% step 3050, t = 151 Myr, dt = 0.0495 Myr (kinetic), about 1 min 10 s left
warning: flow not resolved at t = 160 Myr: 1.9% of the mass moves faster than 289 km/s
   20% step 6105, t = 302.5 Myr, dt = 0.0495 Myr (kinetic), about 59 s left
  100% step 30300, t = 1500 Myr, dt = 0.0201 Myr (end)
`;

describe("a sweep entry's progress", () => {
  it("passes the run's tenths on once the entry has run 10 s (not the 100% line), and its warnings at once, whatever the chunks", () => {
    const warning = "mass=1e-22eV: warning: flow not resolved at t = 160 Myr: 1.9% of the mass moves faster than 289 km/s";
    const tenth = (line: string) => `mass=1e-22eV: ${line.trim()}`;
    const lines = RUN_STDERR.split("\n");
    for (const cut of [1, 7, 64]) {
      const p = new EntryProgress("mass=1e-22eV", 100);
      const shown: string[] = [];
      // the entry's clock: chunks starting before the warning arrive 5 s after the start, the rest 12 s after
      for (let i = 0; i < RUN_STDERR.length; i += cut) shown.push(...p.take(RUN_STDERR.slice(i, i + cut), i < RUN_STDERR.indexOf("warning") ? 105 : 112));
      expect(shown, `chunks of ${cut}`).toEqual([warning, tenth(lines[6]!)]);
    }
    // all at once after 12 s: every tenth but the last
    expect(new EntryProgress("mass=1e-22eV", 100).take(RUN_STDERR, 112)).toEqual([tenth(lines[3]!), tenth(lines[4]!), warning, tenth(lines[6]!)]);
  });

  it("gives the run's last error line as a failure's reason, else its last line", () => {
    const failed = new EntryProgress("e", 0);
    failed.take("evolving\n   10% step 5\npsibox: integrator.mass_tolerance: the mass changed by 3e-9 (tolerance 1.0e-18)\n", 1);
    expect(failed.reason).toBe("integrator.mass_tolerance: the mass changed by 3e-9 (tolerance 1.0e-18)");
    const killed = new EntryProgress("e", 0);
    killed.take("evolving\n   10% step 5, t = 1 Myr\n", 1);
    expect(killed.reason).toBe("10% step 5, t = 1 Myr");
    expect(new EntryProgress("e", 0).reason).toBeUndefined();
  });
});
