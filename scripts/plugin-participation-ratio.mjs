// A run with the researcher's own per-step quantity in its time series: the participation
// ratio PR = (Σρ)² / (cells · Σρ²), the fraction of the box the mass effectively fills
// (1 for a uniform field, small once it has collapsed into a few dense objects).
// Usage: node participation-ratio.mjs CONFIG.toml [OUTPUT_DIR]
import path from "node:path";
import { loadConfig, prepareOutputDir, resolveRun, runSimulation } from "psibox";

let cells = 0;
let ratio = NaN;
const measure = (m) => (m.rho * m.rho) / (cells * m.rho2);

/** @type {import("psibox").RunPlugin} */
const participation = {
  name: "participation",
  measures: ["moments"], // Σ|ψ|², Σ|ψ|⁴, … of the field after every step
  columns: ["participation_ratio"],
  start(context, facts) {
    cells = context.grid.size;
    ratio = measure(facts.sums.moments);
  },
  afterStep(facts) {
    ratio = measure(facts.sums.moments);
  },
  output(facts) {
    if (facts.kind === "row") return [ratio];
  },
  stop: () => ({ participation_ratio_final: ratio }), // its part of summary.json
};

const [file, dir] = process.argv.slice(2);
const run = resolveRun(loadConfig(file), path.basename(file, ".toml"), process.cwd());
const outputDir = dir ? path.resolve(dir) : run.outputDir;
prepareOutputDir(outputDir, true);
const summary = await runSimulation({ ...run, outputDir }, { plugins: [participation] });
console.log(`${summary.status} after ${summary.steps} steps; participation ratio ${ratio.toFixed(4)}; see ${outputDir}/timeseries.csv`);
