// psibox's chart writer (src/report/chart/): tick values, rounded domains and positions against the
// general-purpose vega-scale package from the registry (the outside reference: its scale("linear") and
// scale("log") are d3-scale's, and its validTicks is what thinned given tick values in the figures before),
// and charts that resvg renders, carrying their titles, axis titles and legend labels.
import { describe, expect, it } from "vitest";
import * as vegaScaleModule from "vega-scale";
import { linearTicks, logTicksOf, niceLinear, niceLog, thinTicks } from "../../src/report/chart/ticks.js";
import { position } from "../../src/report/chart/scales.js";
import { chartSvg, type ChartSpec } from "../../src/report/chart/chart.js";
import { textBox } from "../../src/report/chart/text.js";

type D3Scale = { domain(d: number[]): D3Scale; range(r: number[]): D3Scale; ticks(n: number): number[]; nice(): D3Scale; (v: number): number } & { domain(): number[] };
// the package's own type declarations leave these two out
const { scale: vegaScale, validTicks } = vegaScaleModule as unknown as { scale(type: string): () => D3Scale; validTicks(s: D3Scale, values: number[], count: number): number[] };
const linear = (d: readonly number[]) => vegaScale("linear")().domain([...d]);
const log = (d: readonly number[]) => vegaScale("log")().domain([...d]);

describe("ticks against vega-scale (the reference)", () => {
  const linearDomains: [number, number][] = [
    [0, 1],
    [0, 26.6],
    [-0.02, 1.02],
    [-7.3, -0.2],
    [-1e6, 3e5],
    [1e-9, 3.3e-9],
    [10, 0],
    [3, 3],
    [0.1, 0.30000000000000004],
  ];
  for (const [a, b] of linearDomains)
    it(`linear [${a}, ${b}]: the same ticks, and the same rounded domain`, () => {
      expect(linearTicks(a, b, 5)).toEqual(linear([a, b]).ticks(5));
      expect(niceLinear([a, b])).toEqual(linear([a, b]).nice().domain());
    });

  const logDomains: [number, number][] = [
    [0.01, 10],
    [1e-4, 1],
    [1e4, 1e14],
    [1e-100, 1],
    [0.3, 0.7],
    [2, 2],
    [5e-9, 3e3],
    [1e3, 1e-2],
  ];
  for (const [a, b] of logDomains)
    it(`log [${a}, ${b}]: the same ticks (minor ones within few decades), and the same whole-decade domain`, () => {
      expect(logTicksOf(a, b, 5)).toEqual(log([a, b]).ticks(5));
      expect(niceLog([a, b])).toEqual(log([a, b]).nice().domain());
    });

  it("place values where the reference scales do (linear, log, reversed range)", () => {
    for (const v of [-3, 0, 0.25, 7, 1e3]) expect(position({ log: false, domain: [-5, 20], range: [190, 0] }, v)).toBeCloseTo(linear([-5, 20]).range([190, 0])(v), 10);
    for (const v of [1e-9, 3e-4, 1, 77]) expect(position({ log: true, domain: [1e-9, 1e3], range: [0, 300] }, v)).toBeCloseTo(log([1e-9, 1e3]).range([0, 300])(v), 10);
  });

  it("thin given tick values as vega-scale's validTicks does: inside the range, every other one until at most five", () => {
    const values = [1e-8, 1e-6, 1e-4, 1e-2, 1, 100, 1e4];
    for (const [domain, range] of [
      [[1e-9, 1e3], [190, 0]],
      [[1e-5, 1e5], [0, 300]],
      [[1e-3, 1e-1], [0, 300]],
    ] as const) {
      const ref = log(domain).range([...range]);
      const ours = thinTicks(values, (v) => position({ log: true, domain, range }, v), range, 5);
      expect(ours).toEqual(validTicks(ref, values, 5));
    }
  });
});

describe("charts", () => {
  const spec: ChartSpec = {
    title: "spectra & <profiles>",
    subtitle: "t = 0 Myr (step 0)",
    panels: [
      { width: 300, height: 190, x: { title: "k [1/kpc]", log: true }, y: { title: "P(k) [kpc³]", log: true }, series: [{ name: "measured", colour: "#1f5fa8", x: [0.1, 1, 3], y: [5, 0.2, 1e-3], mark: "points" }] },
      { width: 300, height: 120, x: { title: "r [kpc]" }, y: { title: "ξ(r)" }, series: [{ name: "random phase", colour: "#f58518", x: [0, 1, 2], y: [1, 0.3, -0.05], mark: "line" }] },
    ],
    legend: { orient: "right", title: "law", entries: [{ label: "measured", colour: "#1f5fa8" }, { label: "random phase", colour: "#f58518" }], symbol: "circle" },
  };

  it("render in resvg at their stated size and carry the title, the axis titles and the legend labels", async () => {
    const { Resvg } = await import("@resvg/resvg-js");
    const { svg, origin } = chartSvg(spec);
    const [w, h] = /width="(\d+)" height="(\d+)"/.exec(svg)!.slice(1).map(Number);
    const image = new Resvg(svg, { font: { loadSystemFonts: false } }).render();
    expect([image.width, image.height]).toEqual([w, h]);
    for (const text of ["spectra &amp; &lt;profiles&gt;", "t = 0 Myr (step 0)", "k [1/kpc]", "P(k) [kpc³]", "r [kpc]", "ξ(r)", ">law<", ">measured<", ">random phase<"]) expect(svg).toContain(text);
    // the plot area's origin leaves room for the title above and the axis labels to the left
    expect(origin[0]).toBeGreaterThan(40);
    expect(origin[1]).toBeGreaterThan(30);
  });

  it("make room for the subtitles of a set of figures: two frames with subtitles of different lengths are one width", () => {
    const frame = (subtitle: string) => ({ title: "Density", subtitle, subtitleRoom: ["t = 1.25 Gyr (step 12345); colours: the run's maximum", "t = 0 Gyr (step 0)"], panels: [{ width: 120, height: 80, x: { title: "x" }, y: { title: "y" }, series: [] }] });
    const width = (svg: string) => Number(/width="(\d+)"/.exec(svg)![1]);
    const [a, b] = [chartSvg(frame("t = 0 Gyr (step 0)")).svg, chartSvg(frame("t = 1.25 Gyr (step 12345); colours: the run's maximum")).svg];
    expect(width(a)).toBe(width(b));
    // and as wide as the widest subtitle needs: wider than the same chart without the room
    expect(width(a)).toBeGreaterThan(width(chartSvg({ ...frame("t = 0 Gyr (step 0)"), subtitleRoom: [] }).svg));
  });

  it("are drawn the same by the figure workers as on this thread", async () => {
    const { Resvg } = await import("@resvg/resvg-js");
    const { PNG_SCALE, figureFontFiles, renderChart } = await import("../../src/report/render.js");
    const { drawFigure } = await import("../../src/report/figure-draw.js");
    const [there, here] = await Promise.all([renderChart(spec), drawFigure(Resvg, { chart: spec, scale: PNG_SCALE }, figureFontFiles())]);
    expect(there.svg).toBe(here.svg);
    expect(Buffer.compare(there.png, Buffer.from(here.png))).toBe(0);
  });

  it("label ticks through psibox's formatter and keep labels from overlapping", () => {
    const { svg } = chartSvg({ title: "t", panels: [{ width: 420, height: 260, x: { title: "k", log: true, domain: [0.01, 10] }, y: { title: "E", log: true, domain: [1e4, 1e14] }, series: [] }] });
    const labels = [...svg.matchAll(/<text class="tick" x="([-\d.]+)" y="([-\d.]+)"[^>]*>([^<]+)<\/text>/g)];
    const x = labels.filter((m) => Number(m[2]) === 15);
    // 28 ticks over three decades on 420 units: the powers of ten labelled, the minor ticks shorter and unlabelled (common practice for log axes)
    expect(x.map((m) => m[3])).toEqual(["0.01", "0.1", "1", "10"]);
    const bottom = /<g class="axis bottom"[^>]*><path class="ticks" d="([^"]+)"/.exec(svg)![1]!;
    expect(bottom.match(/v5/g)).toHaveLength(4);
    expect(bottom.match(/v3/g)).toHaveLength(24);
    expect(svg).toContain(">10¹⁴<");
    // where only two powers of ten show, twice and five times them are labelled too
    const narrow = chartSvg({ title: "t", panels: [{ width: 420, height: 260, x: { title: "k", log: true, domain: [0.5, 20] }, y: { title: "E", domain: [0, 1] }, series: [] }] }).svg;
    const nx = [...narrow.matchAll(/<text class="tick" x="([-\d.]+)" y="15"[^>]*>([^<]+)<\/text>/g)].map((m) => m[2]);
    expect(nx).toEqual(["0.5", "1", "2", "5", "10", "20"]);
    for (let i = 1; i < x.length; i++) {
      const [a, b] = [x[i - 1]!, x[i]!].map((m) => textBox(Number(m[1]), 7, m[3]!, { size: 10, anchor: "middle", baseline: "top" }));
      expect(b!.x1).toBeGreaterThanOrEqual(a!.x2);
    }
  });
});
