// The clocks figure's labels (src/report/run-plots.ts): a threshold's label stays inside its panel wherever the
// line lies, and a clock's label keeps clear of the next clock's line. Positions are read from the SVG that Vega
// writes (text elements placed by translate(x, y), the plot areas by their group's translate).
import { describe, expect, it } from "vitest";
import { clocksPlot } from "../../src/report/run-plots.js";

/** The SVG's text elements: their text, their translate(x, y) within their panel's group, and their anchor. */
function texts(svg: string): { text: string; x: number; y: number; anchor: string }[] {
  return [...svg.matchAll(/<text([^>]*)transform="translate\(([-\d.]+),([-\d.]+)\)"[^>]*>([^<]*)<\/text>/g)].map((m) => ({
    text: m[4]!,
    x: Number(m[2]),
    y: Number(m[3]),
    anchor: /text-anchor="(\w+)"/.exec(m[1]!)?.[1] ?? "start",
  }));
}

const rows = (f: (t: number) => Record<string, number>) => Array.from({ length: 51 }, (_, i) => ({ t: String(2 * i), ...Object.fromEntries(Object.entries(f(2 * i)).map(([k, v]) => [k, String(v)])) }));

describe("the clocks figure", () => {
  it("puts the phase-diffusion label inside its panel when the line lies on the panel's bottom edge (a free packet: no decay at all)", async () => {
    const series = rows((t) => ({ squeezing_dB: 0, log10_meanfield_fraction: 0, breakdown_integral: 0.001 * t }));
    const { svg } = await clocksPlot(series, "t", "t [Myr]", { lnN: 221, targetDb: -10, rings: [] });
    const label = texts(svg).find((t) => t.text === "phase diffusion at 1")!;
    // the panel is 110 units high: the label sits above the bottom line, not among the tick labels under it
    expect(label).toBeDefined();
    expect(label.y).toBeGreaterThan(0);
    expect(label.y).toBeLessThan(110);
    const squeezing = texts(svg).find((t) => t.text === "target −10 dB")!;
    expect(squeezing.y).toBeLessThan(110);
  });

  it("puts a clock's label left of its line when the next clock rings right after it", async () => {
    const series = rows((t) => ({ squeezing_dB: -0.1 * t, log10_meanfield_fraction: -1e-3 * t, breakdown_integral: 0.01 * t }));
    const { svg } = await clocksPlot(series, "t", "t [Myr]", { lnN: 50, targetDb: -10, rings: [{ t: 40, label: "onset" }, { t: 44, label: "target" }, { t: 90, label: "late" }] });
    const [onset, target, late] = ["onset", "target", "late"].map((l) => texts(svg).find((t) => t.text === l)!);
    expect(onset!.anchor).toBe("end");
    expect(target!.anchor).toBe("start");
    expect(late!.anchor).toBe("start");
    // each label on its side of its own line (40 and 44 Myr of 100 on a 300-unit axis: 120 and 132 units)
    expect(onset!.x).toBeLessThan(120);
    expect(target!.x).toBeGreaterThan(132);
  });

  it("puts a clock's label right of the next clock's line when there is no room left of its own (clocks ringing early)", async () => {
    const series = rows((t) => ({ squeezing_dB: -0.1 * t, log10_meanfield_fraction: -1e-3 * t, breakdown_integral: 0.01 * t }));
    const { svg } = await clocksPlot(series, "t", "t [Myr]", { lnN: 50, targetDb: -10, rings: [{ t: 4, label: "onset" }, { t: 6, label: "target" }] });
    const [onset, target] = ["onset", "target"].map((l) => texts(svg).find((t) => t.text === l)!);
    // both start right of the later line (6 Myr of 100 on a 300-unit axis: 18 units), one above the other
    expect(onset!.anchor).toBe("start");
    expect(onset!.x).toBeGreaterThan(18);
    expect(target!.x).toBeGreaterThan(18);
    expect(target!.y).toBeGreaterThan(onset!.y);
  });
});
