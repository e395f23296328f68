/** Reading config values: units, positivity, one value per axis; errors name the key. */
import { ConfigError } from "../core/errors.js";
import { parseAs, UnitSyntaxError, type QuantityKind, type UnitContext } from "../physics/units.js";

/** Parse a config value of a kind to SI, with errors naming the key. */
export function read(key: string, text: string, kind: QuantityKind, ctx: UnitContext): number {
  try {
    return parseAs(text, kind, ctx);
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw new ConfigError(key, e.message);
    throw e;
  }
}

/** Check that a value is positive and finite. */
export function positive(key: string, value: number, what = "positive"): number {
  // the value may be in code units: say what is wrong with it, never the number itself
  if (!(value > 0) || !Number.isFinite(value)) throw new ConfigError(key, `must be ${what}, got ${value < 0 ? "a negative value" : value === 0 ? "zero" : "a value that is not a finite number"}`);
  return value;
}

/** One value per axis (a single value is repeated). */
export function perAxis(key: string, values: string | readonly string[], dims: number): readonly string[] {
  const list = typeof values === "string" ? Array<string>(dims).fill(values) : values;
  if (list.length !== dims) throw new ConfigError(key, `give one value or ${dims} (one per axis), got ${list.length}`);
  return list;
}

