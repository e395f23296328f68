/**
 * The ensemble's classical companion (ensemble/companion.ts) run with the
 * plug-ins its config turns on: the quantum sidecar and the depletion
 * probes. It lives here because those plug-ins are assembled in the
 * application layer; `psibox ensemble` hands it to the ensemble.
 */
import { takeRunFolder } from "../simulation/run-folder.js";
import type { CompanionRunner } from "../ensemble/companion.js";
import { runSimulation } from "./run.js";

/** Run (resume: continue from its checkpoint) the companion in its own folder, which it holds for the run. */
export const runCompanion: CompanionRunner = async (companion, options) => {
  const owned = takeRunFolder(companion.outputDir, { force: true, resume: options.resume });
  try {
    const summary = await runSimulation(companion, { reporter: options.reporter, resume: options.resume, ...(options.stopRequested ? { stopRequested: options.stopRequested } : {}) });
    return { status: summary.status, ...(summary.reason ? { reason: String(summary.reason) } : {}) };
  } finally {
    owned.lock.release();
  }
};
