/**
 * The application layer: a run assembled with its plug-ins. The plug-ins a
 * config asks for (the quantum sidecar, `[sidecar] enabled`, with the species' modes in a run of
 * several species; the vortex
 * census, `output.vortex_census`; the flow-resolution check, always) come first, then
 * the caller's own, in the order given. The CLI and the public API call this.
 */
import { contactCode } from "../physics/contact.js";
import { CodeUnits } from "../physics/units.js";
import type { ResolvedRun } from "../config/resolve.js";
import { simulate, type RunOptions, type RunSummary } from "../simulation/run.js";
import type { RunPlugin } from "../simulation/plugin.js";
import { sidecarPlugin } from "../quantum/sidecar-plugin.js";
import { vortexCensusPlugin } from "./vortex-census-plugin.js";
import { flowResolutionPlugin } from "./flow-resolution-plugin.js";
import { lyapunovPlugin } from "./lyapunov-plugin.js";
import { depletionPlugin } from "./depletion-plugin.js";
import { speciesModesPlugin, type SpeciesOfRun } from "./species-modes-plugin.js";
import { speciesContacts } from "../simulation/species-energies.js";

/** The built-in plug-ins a resolved config turns on. */
export function configuredPlugins(run: ResolvedRun): RunPlugin[] {
  return [
    ...(run.sidecar.enabled ? [sidecarPlugin({ ...run.sidecar, contact: runContact(run) })] : []),
    ...(run.sidecar.enabled && run.species.length ? [speciesModesPlugin(speciesOf(run), run.grid.gravity, run.grid.poisson)] : []),
    ...(run.output.vortexCensus ? [vortexCensusPlugin(run.grid.cells.length)] : []),
    flowResolutionPlugin(),
    ...(run.breakdown.tangent ? [lyapunovPlugin({ interval: run.breakdown.interval, seed: run.breakdown.seed, region: run.breakdown.region, twinOffset: run.breakdown.twinOffset })] : []),
    ...(run.breakdown.probes > 0 ? [depletionPlugin({ probes: run.breakdown.probes, seed: run.breakdown.seed, fraction: run.breakdown.depletionFraction })] : []),
  ];
}

/** Every species of a run of several, the first one's first, with its own contact coefficient (code units). */
function speciesOf(run: ResolvedRun): SpeciesOfRun[] {
  const contacts = speciesContacts(run, new CodeUnits(run.particleMassKg, run.lengthUnitM));
  return [{ name: run.firstSpecies, massRatio: 1 }, ...run.species.map((sp) => ({ name: sp.name, massRatio: sp.massRatio }))].map((s, i) => ({ ...s, contact: contacts[i]! }));
}

/**
 * Run a resolved config (the output folder must exist: see prepareOutputDir)
 * with the config's plug-ins and then `options.plugins`, the caller's own.
 */
export async function runSimulation(run: ResolvedRun, options: RunOptions = {}): Promise<RunSummary> {
  return simulate(run, { ...options, plugins: [...configuredPlugins(run), ...(options.plugins ?? [])] });
}

/** The run's contact coefficient in code units (0 without a contact interaction). */
function runContact(run: ResolvedRun): number {
  return run.contact ? contactCode(run.contact.scatteringLengthM, new CodeUnits(run.particleMassKg, run.lengthUnitM)) : 0;
}
