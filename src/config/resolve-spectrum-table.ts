/**
 * Resolution of a cosmological field's spectrum table (initial.transfer =
 * "table"): the keys checked, the units read, the file loaded, and its k range
 * checked against the grid's modes (and, for T(k), the σ₈ integrand).
 */
import { ConfigError, InputError } from "../core/errors.js";
import { parseUnit } from "../physics/units.js";
import type { TabulatedSpectrum } from "../physics/cosmology/tabulated.js";
import { readSpectrumTable } from "./spectrum-table.js";
import type { InitialScope, InitialSection } from "./resolve-initial.js";

const TABLE_KEYS = ["spectrum_table", "table_quantity", "table_k_unit", "table_power_unit"] as const;

/** A unit of dimension length^L, in SI; errors name the key. */
function unitOf(key: string, text: string, L: number, example: string, scope: InitialScope): number {
  let q;
  try {
    q = parseUnit(text, scope.ctx);
  } catch (e) {
    throw new ConfigError(key, (e as Error).message);
  }
  if (q.dim.L !== L || q.dim.M !== 0 || q.dim.T !== 0 || !(q.si > 0)) throw new ConfigError(key, `"${text}" is not ${example}`);
  return q.si;
}

/** The k range [1/Mpc] the field needs: the fundamental to the corner of the Fourier box, and for T(k) also 1e-3 … 10 h/Mpc (σ₈). */
function neededRange(quantity: "power" | "transfer", scope: InitialScope, lengthMpc: number, h: number): [number, number] {
  const cells = scope.config.grid.cells;
  const n = typeof cells === "number" ? [cells] : cells;
  const lo = (2 * Math.PI) / (Math.max(...scope.lengths) * lengthMpc);
  const hi = Math.hypot(...n.map((c, i) => (Math.PI * c) / (scope.lengths[i] as number))) / lengthMpc;
  return quantity === "transfer" ? [Math.min(lo, 1e-3 * h), Math.max(hi, 10 * h)] : [lo, hi];
}

/** The table of a cosmological field, or nothing for the fitting formulas (whose runs must not set the table keys). */
export function resolveSpectrumTable(ic: InitialSection<"cosmological">, scope: InitialScope, littleH: number): { table?: TabulatedSpectrum } {
  if (ic.transfer !== "table") {
    const stray = TABLE_KEYS.find((k) => ic[k] !== undefined);
    if (stray) throw new ConfigError(`initial.${stray}`, 'needs initial.transfer = "table"');
    return {};
  }
  if (ic.spectrum_table === undefined) throw new ConfigError("initial.spectrum_table", 'missing; transfer = "table" reads k and P(k) (or T(k)) from a text file');
  const mpc = parseUnit("Mpc").si;
  const quantity = ic.table_quantity ?? "power";
  const kPerMpc = unitOf("initial.table_k_unit", ic.table_k_unit ?? "h/Mpc", -1, 'an inverse length, e.g. "h/Mpc" or "1/Mpc"', scope) * mpc;
  const pScale =
    quantity === "power" ? unitOf("initial.table_power_unit", ic.table_power_unit ?? "Mpc^3/h^3", 3, 'a volume, e.g. "Mpc^3/h^3" or "Mpc^3"', scope) / mpc ** 3 : 1;
  const file = ic.spectrum_table;
  const table = readSpectrumTable(file, quantity, kPerMpc, pScale);
  const [needLo, needHi] = neededRange(quantity, scope, scope.units.lengthM / mpc, littleH);
  const [lo, hi] = [table.k[0]!, table.k[table.k.length - 1]!];
  if (lo > needLo * (1 + 1e-9) || hi < needHi * (1 - 1e-9)) {
    const r = (a: number, b: number) => `${(a / littleH).toPrecision(4)} … ${(b / littleH).toPrecision(4)} h/Mpc`;
    const who = quantity === "transfer" ? "the grid and the sigma_8 integral need" : "the grid needs";
    throw new InputError(`${file}: the table covers k = ${r(lo, hi)}, but ${who} ${r(needLo, needHi)}; extend the table (or change grid.box or grid.cells)`);
  }
  return { table };
}
