/** Every command of psibox, in the order `psibox --help` lists them. Add a command here and in its own file. */
import type { AnyCommandSpec } from "../options.js";
import { runSpec } from "./run.js";
import { icSpec } from "./ic.js";
import { extendSpec } from "./extend.js";
import { initSpec } from "./init.js";
import { inspectSpec } from "./inspect.js";
import { importSpec } from "./import.js";
import { sweepSpec } from "./sweep.js";
import { analyzeSpec, reportSpec } from "./analyze.js";
import { clocksSpec, estimateSpec } from "./clocks.js";
import { ensembleSpec } from "./ensemble.js";

export const COMMANDS: readonly AnyCommandSpec[] = [runSpec, extendSpec, icSpec, initSpec, inspectSpec, importSpec, sweepSpec, ensembleSpec, analyzeSpec, reportSpec, clocksSpec, estimateSpec];
