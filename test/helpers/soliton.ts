/**
 * One shared soliton for the tests: the 3D ground state of mass M with r₉₉ = 0.3 box lengths (M r₉₉ = 9.94583
 * ħ²/(Gm²), Chavanis 2011, PRD 84, 043531), relaxed by imaginary time in an isolated unit box of n³ cells from a
 * centred Gaussian guess. Relaxing it at 64³ takes about a minute, so it is computed once per version of the
 * code and kept in the system's temporary folder (keyed by a hash of every source file under src/ and of the
 * parameters); test files running at the same time wait for the one that computes it.
 */
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Grid } from "../../src/grid/grid.js";
import { IsolatedPoisson } from "../../src/fields/poisson.js";
import { relaxGroundState, type GroundState } from "../../src/ground-state/imaginary-time.js";
import { fillComplex } from "./fields.js";

/** M r₉₉ in ħ²/(Gm²) of the exact ground state (Chavanis 2011). */
export const R99 = 9.94583;
/** The fixture's mass in code units (ħ/m = 1, 4πG = 1, box side 1): r₉₉ = 0.3. */
export const SOLITON_MASS = (R99 * 4 * Math.PI) / 0.3;
/** σ of the Gaussian guess (box lengths). */
const GUESS_WIDTH = 0.08;

function guess(grid: Grid): Float64Array {
  const s = GUESS_WIDTH;
  const amp = Math.sqrt(SOLITON_MASS / Math.pow(2 * Math.PI * s * s, 1.5));
  const r2 = (x: number, y: number, z: number) => (x - 0.5) ** 2 + (y - 0.5) ** 2 + (z - 0.5) ** 2;
  return fillComplex(grid, (x, y, z) => [amp * Math.exp(-r2(x, y, z) / (4 * s * s)), 0]);
}

function sourceHash(): string {
  const hash = crypto.createHash("sha256");
  const walk = (dir: string): void => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (p.endsWith(".ts")) hash.update(p).update(fs.readFileSync(p));
    }
  };
  walk(path.resolve("src"));
  return hash.update(`${SOLITON_MASS} ${GUESS_WIDTH}`).digest("hex").slice(0, 16);
}

function save(file: string, gs: GroundState): void {
  const { psi, phi, ...scalars } = gs;
  const header = Buffer.from(JSON.stringify({ ...scalars, psi: psi.length, phi: phi.length }).padEnd(1024));
  const tmp = `${file}.${process.pid}.tmp`;
  fs.writeFileSync(tmp, Buffer.concat([header, Buffer.from(psi.buffer, psi.byteOffset, psi.byteLength), Buffer.from(phi.buffer, phi.byteOffset, phi.byteLength)]));
  fs.renameSync(tmp, file);
}

function load(file: string): GroundState {
  const bytes = fs.readFileSync(file);
  const head = JSON.parse(bytes.subarray(0, 1024).toString()) as Omit<GroundState, "psi" | "phi"> & { psi: number; phi: number };
  const data = new Float64Array(bytes.buffer.slice(bytes.byteOffset + 1024, bytes.byteOffset + bytes.byteLength));
  return { ...head, psi: data.slice(0, head.psi), phi: data.slice(head.psi, head.psi + head.phi) };
}

/** The relaxed soliton on n³ cells, with its grid (computed once per code version, then read back). */
export async function relaxedSoliton(n: number): Promise<{ gs: GroundState; grid: Grid; mass: number }> {
  const grid = new Grid([n, n, n], [1, 1, 1]);
  const dir = path.join(os.tmpdir(), "psibox-test-fixtures");
  fs.mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `soliton-${n}-${sourceHash()}.bin`);
  const lock = `${file}.lock`;
  while (!fs.existsSync(file)) {
    let fd: number;
    try {
      fd = fs.openSync(lock, "wx");
    } catch {
      // another test file is relaxing it: wait (a lock older than 10 minutes is left over from a killed run)
      const held = fs.statSync(lock, { throwIfNoEntry: false });
      if (held && Date.now() - held.mtimeMs > 600_000) fs.rmSync(lock, { force: true });
      await new Promise((r) => setTimeout(r, 200));
      continue;
    }
    try {
      // fixtures of older code versions, untouched for a day, go
      for (const old of fs.readdirSync(dir)) {
        const p = path.join(dir, old);
        if (old.startsWith(`soliton-${n}-`) && Date.now() - fs.statSync(p).mtimeMs > 86_400_000) fs.rmSync(p, { force: true });
      }
      save(file, relaxGroundState(grid, new IsolatedPoisson(grid), guess(grid)));
    } finally {
      fs.closeSync(fd);
      fs.rmSync(lock, { force: true });
    }
  }
  return { gs: load(file), grid, mass: SOLITON_MASS };
}
