/**
 * The flags that choose the mode's quantum state and its decoherence, shared
 * by `psibox estimate` and `psibox clocks`: --squeeze, --squeeze-angle,
 * --thermal, --loss-rate, --dephasing-rate. Bad values are one-line input
 * errors naming the flag.
 */
import type { OptionTable } from "./options.js";
import { InputError } from "../core/errors.js";
import { parseAs, UnitSyntaxError } from "../physics/units.js";
import { validateStart, type GaussianStart } from "../quantum/gaussian-start.js";

export interface ModeStateFlags {
  squeeze?: string;
  squeezeAngle?: string;
  thermal?: string;
  lossRate?: string;
  dephasingRate?: string;
}

/** The state and the rates, read from the flags (rates in 1/s). */
export interface ModeState {
  readonly start: GaussianStart;
  readonly lossRatePerS: number;
  readonly dephasingRatePerS: number;
}

/** The five flags' entries of an options table. */
export const MODE_STATE_OPTIONS: OptionTable<ModeStateFlags> = {
  squeeze: { flags: "--squeeze <r>", help: "the mode starts squeezed with parameter r ≥ 0 (default 0: coherent)" },
  squeezeAngle: { flags: "--squeeze-angle <rad>", help: "angle of the squeezing from the mean field's direction: 0 squeezes the number, 3.1416 the phase (default 0)" },
  thermal: { flags: "--thermal <quanta>", help: "mean thermal quanta in the start (default 0)" },
  lossRate: { flags: "--loss-rate <rate>", help: 'rate at which the mode loses quanta, e.g. "1/Gyr" (default 0)' },
  dephasingRate: { flags: "--dephasing-rate <rate>", help: 'dephasing rate of the mode, e.g. "0.1/Myr" (default 0)' },
};

function number(flag: string, text: string | undefined, what: string): number {
  if (text === undefined) return 0;
  const v = Number(text);
  if (text.trim() === "" || !Number.isFinite(v) || v < 0) throw new InputError(`--${flag}: must be ${what}, got "${text}"`);
  return v;
}

function rate(flag: string, text: string | undefined): number {
  if (text === undefined) return 0;
  let v: number;
  try {
    v = text.trim() === "0" ? 0 : parseAs(text, "rate");
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw new InputError(`--${flag}: ${e.message}`);
    throw e;
  }
  if (!(Number.isFinite(v) && v >= 0)) throw new InputError(`--${flag}: must be a rate ≥ 0 with a unit, e.g. "1/Gyr", got "${text}"`);
  return v;
}

/** Parse and check the flags for a mode of N quanta. */
export function readModeState(flags: ModeStateFlags, N: number): ModeState {
  const start: GaussianStart = {
    squeeze: number("squeeze", flags.squeeze, "a finite squeeze parameter r ≥ 0"),
    squeezeAngle: flags.squeezeAngle === undefined ? 0 : Number(flags.squeezeAngle),
    thermal: number("thermal", flags.thermal, "a finite number of thermal quanta ≥ 0"),
  };
  if (!Number.isFinite(start.squeezeAngle)) throw new InputError(`--squeeze-angle: must be a finite angle in radians, got "${flags.squeezeAngle}"`);
  try {
    validateStart(N, start);
  } catch (e) {
    if (e instanceof RangeError) throw new InputError(`--${e.message}`);
    throw e;
  }
  return { start, lossRatePerS: rate("loss-rate", flags.lossRate), dephasingRatePerS: rate("dephasing-rate", flags.dephasingRate) };
}
