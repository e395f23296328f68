/**
 * The report of a parameter sweep (psibox report on a sweep's folder): what
 * ran, one table row per entry (its status, span, mass drift and clocks, from
 * the folders themselves, as sweep-summary.csv), and for each swept key whose
 * values are numbers of one unit a figure of the clocks against it: one
 * colour per clock, a line through the entries that share the other keys'
 * values, filled points where the clock rang within the run and open ones
 * where it was projected past the run's end.
 */
import fs from "node:fs";
import path from "node:path";
import type { TopLevelSpec } from "vega-lite";
import { formatNumber } from "../core/format.js";
import { formatDuration } from "../quantum/clocks.js";
import { PLANCK_AGE_S } from "../quantum/sidecar-report.js";
import { YEAR_S } from "../physics/constants.js";
import { SCHEMA, PANEL, logAxis, type Row } from "../report/plots.js";
import { renderVegaLite, type Figure } from "../report/render.js";
import { esc, figure, table, writePage } from "../report/report-parts.js";
import { buildSummary, entriesText, type SummaryRow } from "./summary.js";

/** The clocks of a summary row: its column stem, how it says it rang, and its label. */
const CLOCKS: readonly { stem: string; measured: boolean; label: string }[] = [
  { stem: "squeezing-onset", measured: false, label: "squeezing onset" },
  { stem: "squeezing-level", measured: false, label: "squeezing level" },
  { stem: "phase-diffusion", measured: false, label: "phase diffusion" },
  { stem: "phase-diffusion-adiabatic", measured: false, label: "phase diffusion (adiabatic)" },
  { stem: "classical-breakdown", measured: false, label: "breakdown (estimate)" },
  { stem: "scrambling_clock", measured: true, label: "scrambling (measured λ)" },
  { stem: "depletion_from_rate_clock", measured: true, label: "depletion from λ (measured)" },
  { stem: "depletion_clock", measured: true, label: "depletion (measured)" },
];

/** Clocks later than this are left off the figures (in the table only): they would press the rest into a sliver. */
const LATEST_DRAWN_S = 10 * PLANCK_AGE_S;

/** A clock of one entry: its time in seconds and whether it rang within the run; undefined when it never does. */
function clockOf(r: SummaryRow, c: (typeof CLOCKS)[number]): { seconds: number; rang: boolean } | undefined {
  const seconds = r[`${c.stem}_s`];
  if (typeof seconds !== "number" || !Number.isFinite(seconds)) return undefined;
  return { seconds, rang: c.measured ? r[`${c.stem}_verdict`] === "rang" : r[`${c.stem}_reached`] === true };
}

/** A swept value as a number and its unit ("2e-22 eV" → 2e-22, "eV"), or undefined (a list, a word, true or false). */
export function sweptNumber(v: unknown): { value: number; unit: string } | undefined {
  if (typeof v === "number") return Number.isFinite(v) ? { value: v, unit: "" } : undefined;
  if (typeof v !== "string") return undefined;
  const m = /^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?)\s*(.*?)\s*$/i.exec(v);
  return m ? { value: Number(m[1]), unit: m[2]! } : undefined;
}

/** The key's values as numbers of one unit, entry by entry, or undefined when they are not (or are all the same). */
function numericKey(values: readonly unknown[]): { values: number[]; unit: string } | undefined {
  const parsed = values.map(sweptNumber);
  if (parsed.some((p) => p === undefined)) return undefined;
  const unit = parsed[0]!.unit;
  if (parsed.some((p) => p!.unit !== unit) || new Set(parsed.map((p) => p!.value)).size < 2) return undefined;
  return { values: parsed.map((p) => p!.value), unit };
}

/**
 * The clocks of every entry against one swept key (entries whose clocks never ring are left out). A line joins
 * the entries that share the other keys' values; in a zipped sweep, where the keys change together, all of them.
 */
export async function clockPlot(rows: readonly SummaryRow[], keys: readonly string[], zipped: boolean, key: string, x: { values: number[]; unit: string }): Promise<Figure | undefined> {
  const others = zipped ? [] : keys.filter((k) => k !== key);
  const points: Row[] = [];
  const late = new Set<string>();
  rows.forEach((r, i) => {
    const group = others.map((k) => `${k} = ${String(r[k])}`).join(", ");
    for (const c of CLOCKS) {
      const clock = clockOf(r, c);
      if (clock && clock.seconds > LATEST_DRAWN_S) late.add(c.label);
      else if (clock && clock.seconds > 0) points.push({ x: x.values[i]!, t: clock.seconds / YEAR_S, clock: c.label, group, rang: clock.rang ? "rang" : "projected" });
    }
  });
  if (points.length === 0) return undefined;
  const lateNote = late.size ? [`not drawn beyond ten times the age of the universe: ${[...late].join(", ")}`] : [];
  const labels = CLOCKS.map((c) => c.label).filter((l) => points.some((p) => p["clock"] === l));
  const positive = x.values.every((v) => v > 0);
  const logX = positive && Math.max(...x.values) >= 10 * Math.min(...x.values);
  const xa = logX ? logAxis(x.values) : undefined;
  const ya = logAxis(points.map((p) => p["t"] as number));
  const xEnc = { field: "x", type: "quantitative", title: `${key}${x.unit ? ` [${x.unit}]` : ""}`, scale: xa ? { type: "log", domain: xa.domain, nice: false } : { zero: false }, ...(xa ? { axis: { values: xa.values } } : {}) };
  const yEnc = { field: "t", type: "quantitative", title: "time from the start [yr]", scale: { type: "log", domain: ya.domain, nice: false }, axis: { values: ya.values } };
  const colour = { field: "clock", type: "nominal", title: null, scale: { domain: labels, scheme: "tableau10" }, legend: { orient: "right", symbolType: "stroke", symbolStrokeWidth: 2 } };
  const joined = others.length ? `a line joins the entries of equal ${others.join(", ")}` : zipped && keys.length > 1 ? `a line joins the entries (${keys.join(", ")} zipped)` : "a line joins the entries";
  return renderVegaLite({
    $schema: SCHEMA,
    title: { text: `Quantum clocks against ${key}`, subtitle: [`filled: rang within the run; open: projected past its end;`, joined, ...lateNote] },
    ...PANEL,
    data: { values: points },
    layer: [
      { mark: { type: "line", strokeWidth: 1.3 }, encoding: { x: xEnc, y: yEnc, color: colour, detail: { field: "group" } } },
      { transform: [{ filter: "datum.rang === 'rang'" }], mark: { type: "point", filled: true, size: 32, opacity: 1 }, encoding: { x: xEnc, y: yEnc, color: colour } },
      { transform: [{ filter: "datum.rang === 'projected'" }], mark: { type: "point", filled: false, size: 32, strokeWidth: 1.3, opacity: 1 }, encoding: { x: xEnc, y: yEnc, color: colour } },
    ],
  } as unknown as TopLevelSpec);
}

/** A clock's cell: its time as the sidecar words it, "≈ " in front when projected; a dash when it never rings. */
function clockCell(r: SummaryRow, c: (typeof CLOCKS)[number]): string {
  const clock = clockOf(r, c);
  return clock === undefined ? "—" : `${clock.rang ? "" : "≈ "}${formatDuration(clock.seconds)}`;
}

/**
 * The entries in two tables that fit the page: each entry's swept values, status and end (where they differ),
 * mass drift and final squeezing; then the swept values again with each clock that rings for some entry.
 */
function entryTables(rows: readonly SummaryRow[], keys: readonly string[]): string {
  const shown = CLOCKS.filter((c) => rows.some((r) => clockOf(r, c) !== undefined));
  const end = (r: SummaryRow): string => (typeof r["end_redshift"] === "number" ? `z = ${formatNumber(r["end_redshift"], 4)}` : typeof r["end_time"] === "number" ? `${formatNumber(r["end_time"], 4)} ${String(r["time_unit"] ?? "")}` : "—");
  const status = (r: SummaryRow): string => (r["reason"] ? `${String(r["status"])}: ${String(r["reason"])}` : String(r["status"]));
  // a column that reads the same in every row is said once, above the table
  const columns: [string, (r: SummaryRow) => unknown][] = [["status", status], ["end", end]];
  const same = columns.filter(([, f]) => rows.every((r) => f(r) === f(rows[0]!)));
  const varying = columns.filter((c) => !same.includes(c));
  const told = same.filter(([, f]) => f(rows[0]!) !== "—");
  const said = told.length ? `<p>Every entry: ${esc(told.map(([name, f]) => `${name} ${String(f(rows[0]!))}`).join("; "))}.</p>\n` : "";
  const entries = table(
    ["entry", ...keys, ...varying.map(([name]) => name), "mass drift", "squeezing at the end [dB]"],
    rows.map((r) => [r["entry"], ...keys.map((k) => r[k]), ...varying.map(([, f]) => f(r)), r["mass_drift"], r["final_squeezing_dB"]]),
  );
  const clocks = shown.length
    ? `<h3>Clocks</h3>\n${table([...keys, ...shown.map((c) => c.label)], rows.map((r) => [...keys.map((k) => r[k]), ...shown.map((c) => clockCell(r, c))]))}
<p class="note">${esc("Counted from each run's start; ≈: projected past the run's end with the last rates; —: never rings, or not measured.")}</p>`
    : "";
  return `${said}${entries}\n${clocks}`;
}

/** Write report.html of the sweep in `sweepDir` (or `outFile`); returns its path. */
export async function writeSweepReport(sweepDir: string, outFile?: string): Promise<string> {
  const { manifest, rows } = buildSummary(sweepDir);
  const counts = new Map<string, number>();
  for (const r of rows) counts.set(String(r["status"]), (counts.get(String(r["status"])) ?? 0) + 1);
  const numeric = manifest.keys.map((k) => [k, numericKey(manifest.entries.map((e) => e.values[k]))] as const);
  const figs = await Promise.all(numeric.map(([k, x]) => (x ? clockPlot(rows, manifest.keys, manifest.combine === "zip", k, x) : Promise.resolve(undefined))));
  const drawn = figs.filter((f) => f !== undefined).length;
  const caption = (k: string) => `Each clock of the whole-box condensate mode against ${k}, counted from each run's start.`;
  const noFigure =
    numeric.every(([, x]) => x === undefined)
      ? "<p>No swept key takes two or more numbers of one unit: the clocks are in the table only.</p>"
      : drawn === 0
        ? rows.some((r) => typeof r["steps"] === "number")
          ? "<p>No entry has a clock that rings or is projected to ring.</p>"
          : "<p>No entry has run yet.</p>"
        : "";
  const body = `<ul class="verdict"><li>${esc(`${entriesText(rows.length)}, the ${manifest.combine === "zip" ? "zipped values" : "combinations"} of ${manifest.keys.join(", ")}: ${[...counts].map(([s, n]) => `${n} ${s}`).join(", ")}.`)}</li></ul>
<h2 id="clocks">Quantum clocks</h2>
${noFigure}<div class="figs">${numeric.map(([k], i) => figure(figs[i], caption(k))).join("")}</div>
<h2 id="entries">Entries</h2>
${entryTables(rows, manifest.keys)}
<p class="note">${esc("Each entry's own report: psibox report on its folder. The same numbers for scripts: sweep-summary.csv.")}</p>`;
  const values = manifest.keys.map((k) => `${JSON.stringify(k)} = [${manifest.entries.map((e) => JSON.stringify(e.values[k])).filter((v, i, all) => all.indexOf(v) === i).join(", ")}]`).join("\n");
  const target = outFile ?? path.join(sweepDir, "report.html");
  fs.mkdirSync(path.dirname(target), { recursive: true });
  writePage(target, `psibox report: sweep ${manifest.name}`, `psibox sweep “${manifest.name}”`, body, `# the swept values (combine = "${manifest.combine}")\n[sweep.values]\n${values}`);
  return target;
}
