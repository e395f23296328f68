/**
 * `psibox import SOURCE --out FILE`: turn a complex field made elsewhere
 * (a NumPy .npy file or an HDF5 dataset) into a psibox snapshot, so the
 * diagnostics and the sidecar can read it.
 */
import { quoteValue } from "../core/sanitize.js";
import fs from "node:fs";
import path from "node:path";
import { InputError, ConfigError } from "../core/errors.js";
import { formatNumber } from "../core/format.js";
import { Dataset, hdf5Reason, loadHdf5, openHdf5 } from "../io/h5.js";
import { readFloat64 } from "../io/slabs.js";
import { readNpyComplex, type ComplexArray } from "../io/npy.js";
import { fileName } from "../core/sanitize.js";
import { writeSnapshot, type SnapshotBackground } from "../io/snapshot.js";
import { sha256 } from "../config/serialize.js";
import { parseAs, parseUnit, QUANTITY_KINDS, UnitSyntaxError, type QuantityKind } from "../physics/units.js";
import { makeBackground } from "../physics/cosmology/background.js";
import { KG_PER_EV, M_SUN_KG, MPC_M, PC_M, YEAR_S } from "../physics/constants.js";
import { Grid } from "../grid/grid.js";
import { VERSION } from "../version.js";

export interface ImportFlags {
  out: string;
  box: string;
  particleMass: string;
  dataset?: string;
  re?: string;
  im?: string;
  densityUnit: string;
  time?: string;
  redshift?: string;
  hubble: string;
  omegaMatter: string;
  gravity: string;
  force: boolean;
}

function option(name: string, text: string, kind: QuantityKind, littleH?: number): number {
  try {
    return parseAs(text, kind, { littleH });
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw new InputError(`--${name}: ${e.message}`);
    throw e;
  }
}

function readHdf5Complex(file: string, flags: ImportFlags): ComplexArray {
  const f = openHdf5(file);
  const get = (p: string): Dataset => {
    const ds = f.get(p);
    if (!(ds instanceof Dataset)) throw new InputError(`${file}: no dataset "${p}"`);
    return ds;
  };
  // read in slabs: a large source never passes through HDF5's heap in one piece
  const numbers = (ds: Dataset): Float64Array => readFloat64(ds, file);
  try {
    if (flags.re !== undefined || flags.im !== undefined) {
      if (flags.re === undefined || flags.im === undefined) throw new InputError("give both --re and --im, or --dataset");
      const re = get(flags.re);
      const im = get(flags.im);
      const shape = re.shape ?? [];
      if (shape.join("×") !== (im.shape ?? []).join("×")) throw new InputError(`${file}: --re and --im datasets differ in shape`);
      const r = numbers(re);
      const i = numbers(im);
      const data = new Float64Array(2 * r.length);
      for (let k = 0; k < r.length; k++) {
        data[2 * k] = r[k] as number;
        data[2 * k + 1] = i[k] as number;
      }
      return { shape, data };
    }
    if (flags.dataset === undefined) throw new InputError("give --dataset PATH (complex, or real with a last axis (re, im)) or --re PATH --im PATH");
    const ds = get(flags.dataset);
    const shape = ds.shape ?? [];
    const value = ds.value;
    if (Array.isArray(value)) {
      // a compound {r, i} dataset (h5py's complex) arrives as nested [re, im] pairs
      const pairs = (value as unknown[]).flat(4) as number[];
      return { shape, data: Float64Array.from(pairs) };
    }
    if (shape.at(-1) !== 2) throw new InputError(`${file}: dataset "${flags.dataset}" must be complex or have a last axis of length 2 (re, im)`);
    return { shape: shape.slice(0, -1), data: numbers(ds) };
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(`${file}: cannot read the field (${hdf5Reason(e)})`);
  } finally {
    f.close();
  }
}

/** SI value of the density unit of |ψ|² in the source; a unit of another dimension is an error. */
function densityUnitSI(text: string, littleH: number | undefined): number {
  try {
    const q = parseUnit(text, { littleH });
    const want = QUANTITY_KINDS.density.dim;
    if (q.dim.L !== want.L || q.dim.M !== want.M || q.dim.T !== want.T) {
      throw new InputError(`--density-unit: "${text}" is not a density (mass per volume); use e.g. ${QUANTITY_KINDS.density.examples}`);
    }
    if (!(q.si > 0)) throw new InputError(`--density-unit: "${text}" must be positive`);
    return q.si;
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw new InputError(`--density-unit: ${e.message}`);
    throw e;
  }
}

/** --redshift, --hubble, --omega-matter: the background of a comoving field (static without --redshift). */
function comoving(flags: ImportFlags): { background: SnapshotBackground; littleH: number | undefined; scaleFactor: number; redshift: number | null } {
  if (flags.redshift === undefined) return { background: { kind: "static" }, littleH: undefined, scaleFactor: 1, redshift: null };
  if (flags.time !== undefined) throw new InputError("give --time (static fields) or --redshift (comoving fields: the time is the cosmic time at that redshift), not both");
  const z = Number(flags.redshift);
  if (!(z > -1)) throw new InputError(`--redshift: must be a number above −1, got ${flags.redshift}`);
  const hubble = option("hubble", flags.hubble, "rate");
  const littleH = hubble / (1e5 / MPC_M);
  const om = Number(flags.omegaMatter);
  if (!(om > 0 && om <= 1)) throw new InputError(`--omega-matter: must be in (0, 1], got ${flags.omegaMatter}`);
  return { background: { kind: "lcdm", hubbleKmSMpc: littleH * 100, omegaMatter: om, omegaRadiation: 0 }, littleH, scaleFactor: 1 / (1 + z), redshift: z };
}

/** Convert a field into a psibox snapshot; returns the exit code. */
export async function importCommand(source: string, flags: ImportFlags): Promise<number> {
  await loadHdf5();
  const isNpy = source.toLowerCase().endsWith(".npy");
  const field = isNpy ? readNpyComplex(source) : readHdf5Complex(source, flags);
  const dims = field.shape.length;
  if (dims < 1 || dims > 3) throw new InputError(`${source}: the field has ${dims} axes; psibox takes 1, 2 or 3`);
  const { background, littleH, scaleFactor, redshift } = comoving(flags);
  const boxTexts = flags.box.split(",").map((s) => s.trim());
  const boxes = boxTexts.length === 1 ? Array<string>(dims).fill(boxTexts[0] as string) : boxTexts;
  if (boxes.length !== dims) throw new InputError(`--box: give one length or ${dims} separated by commas`);
  const kpc = 1e3 * PC_M;
  const boxKpc = boxes.map((b) => option("box", b, "length", littleH) / kpc);
  if (boxKpc.some((b) => !(b > 0))) throw new InputError("--box: lengths must be positive");
  const massKg = option("particle-mass", flags.particleMass, "mass");
  if (!(massKg > 0)) throw new InputError("--particle-mass: must be positive");
  try {
    new Grid(field.shape, boxKpc);
  } catch (e) {
    if (e instanceof ConfigError) throw new InputError(`${source}: field shape ${field.shape.join("×")}: ${e.message.replace(/^grid\.\w+: /, "")}`);
    throw e;
  }
  if (!["periodic", "isolated", "none"].includes(flags.gravity)) throw new InputError(`--gravity: must be periodic, isolated or none, got ${quoteValue(flags.gravity)}`);
  const densitySI = densityUnitSI(flags.densityUnit, littleH);
  const scale = Math.sqrt(densitySI / (M_SUN_KG / kpc ** 3));
  const psi = Float64Array.from(field.data, (v) => v * scale);
  let mass = 0;
  for (let i = 0; i < psi.length; i += 2) mass += psi[i]! ** 2 + psi[i + 1]! ** 2;
  const cellKpc3 = boxKpc.reduce((p, b) => p * b, 1) / (psi.length / 2);
  const depth = Math.pow(boxKpc[0] as number, 3 - dims);
  const gyr = 1e9 * YEAR_S;
  // a comoving field's time is the cosmic time at its redshift (flat ΛCDM with the given H0 and Ω_m)
  const timeValue =
    background.kind === "lcdm"
      ? makeBackground({ kind: "lcdm", hubble0: ((background.hubbleKmSMpc * 1e3) / MPC_M) * gyr, omegaMatter: background.omegaMatter, omegaRadiation: 0, littleH: littleH as number }).time(scaleFactor)
      : flags.time === undefined
        ? 0
        : option("time", flags.time, "time") / gyr;
  const config =
    `# imported by psibox ${VERSION} from ${path.basename(source)}${flags.dataset ? ` (dataset ${flags.dataset})` : ""}\n` +
    `[grid]\ncells = [${field.shape.join(", ")}]\nbox = [${boxes.map((b) => JSON.stringify(b)).join(", ")}]\ngravity = "${flags.gravity}"\n\n` +
    `[particle]\nmass = ${JSON.stringify(flags.particleMass)}\n` +
    (background.kind === "lcdm"
      ? `\n[background]\nkind = "lcdm"\nhubble = ${JSON.stringify(flags.hubble)}\nomega_matter = ${background.omegaMatter}\n`
      : `\n[background]\nkind = "static"\n`);
  const out = path.resolve(flags.out);
  if (!flags.force && fs.existsSync(out)) throw new InputError(`${fileName(flags.out)} exists; pass --force to overwrite it`);
  const folder = path.dirname(out);
  if (!fs.existsSync(folder) || !fs.statSync(folder).isDirectory()) {
    throw new InputError(`--out: the folder of ${fileName(flags.out)} does not exist; create it first or give a path in an existing folder`);
  }
  writeSnapshot(out, {
    meta: {
      kind: "snapshot",
      software: `psibox ${VERSION}`,
      step: 0,
      time: timeValue,
      timeUnit: "Gyr",
      scaleFactor,
      redshift,
      cells: field.shape,
      boxSizeKpc: boxKpc,
      particleMassEv: massKg / KG_PER_EV,
      gravity: flags.gravity,
      background,
      massMsun: mass * cellKpc3 * depth,
      config,
      configSha256: sha256(config),
    },
    psi,
  });
  process.stdout.write(`wrote ${flags.out}: ${field.shape.join("×")} cells, mass ${formatNumber(mass * cellKpc3 * depth, 4)} Msun\n`);
  return 0;
}
