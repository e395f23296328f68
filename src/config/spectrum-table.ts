/**
 * A user's table of the linear spectrum for cosmological initial fields:
 * plain text, one k and one value per line (P(k) of cold matter at z = 0,
 * or the transfer function T(k)), separated by spaces, tabs or commas, with
 * `#` comments and an optional header line; the units of k and P are stated
 * in the config. Errors name the file and the line.
 */
import fs from "node:fs";
import { InputError } from "../core/errors.js";

import type { TabulatedSpectrum } from "../physics/cosmology/tabulated.js";

const NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

/**
 * Read a table; `kPerMpc` converts the file's k to 1/Mpc and `valueScale` its values to Mpc³ (1 for T).
 */
export function readSpectrumTable(file: string, quantity: "power" | "transfer", kPerMpc: number, valueScale: number): TabulatedSpectrum {
  let text: string;
  try {
    text = fs.readFileSync(file, "utf8");
  } catch {
    throw new InputError(`${file}: cannot read the spectrum table (no such file?)`);
  }
  const k: number[] = [];
  const v: number[] = [];
  const name = quantity === "power" ? "P" : "T";
  text.split(/\r?\n/).forEach((raw, index) => {
    const where = `${file}:${index + 1}`;
    const line = raw.replace(/#.*/, "").trim();
    if (line === "") return;
    const cells = line.split(/[\s,;]+/);
    if (cells.length < 2 || !cells.slice(0, 2).every((c) => NUMBER.test(c))) {
      if (k.length === 0 && cells.some((c) => !NUMBER.test(c))) return; // a header line before the data
      throw new InputError(`${where}: expected two numbers (k and ${name}), got "${line}"`);
    }
    const kk = Number(cells[0]) * kPerMpc;
    const vv = Number(cells[1]) * valueScale;
    if (!(kk > 0)) throw new InputError(`${where}: k must be positive, got ${cells[0]}`);
    if (k.length > 0 && !(kk > (k.at(-1) as number))) {
      throw new InputError(`${where}: k = ${cells[0]} does not increase (the line above has a k at least as large); sort the table by k`);
    }
    if (!(vv > 0) || !Number.isFinite(vv)) throw new InputError(`${where}: ${name} must be positive, got ${cells[1]}`);
    k.push(kk);
    v.push(vv);
  });
  if (k.length < 2) throw new InputError(`${file}: the spectrum table needs at least two lines of k and ${name}`);
  return { quantity, k: Float64Array.from(k), values: Float64Array.from(v) };
}

