/**
 * The wasm step engine on banks (fields/wasm-banks.ts): one WasmStepEngine
 * per bank on this thread, each seeing the regions of its own bank at their
 * offsets. A pass runs on the engine of the bank that holds the grid it
 * transforms or writes; a grid it also reads or writes in another bank is
 * copied through this thread's window a chunk of rows at a time (bulk copies
 * of contiguous rows), and the kernels see the window as that grid's rows
 * (the region's offset is moved so that the chunk's first row falls on the
 * window; wasm addresses wrap modulo 2³², so the moved offset may lie below
 * zero). The kernels compute every cell as on one memory, so the field is
 * bit for bit the one-memory engine's; only sums are added in chunks. The
 * elementwise passes written in JavaScript (engine-base.ts) reach every
 * bank through their views.
 */
import { EngineBase } from "./engine-base.js";
import { ELEMENT_BYTES, region, rowCells, type Region, type StepSetup } from "./step-memory.js";
import type { ComplexGrid, LongRowsMode, PoissonTarget, RealGrid } from "./step-engine.js";
import { WasmStepEngine } from "./wasm-step-engine.js";
import { windowName } from "./wasm-banks.js";

/**
 * Rows the rows passes hand the kernel at a time: fewer than its block of 16 keep the block in the faster
 * caches (each row is transformed the same way however many go together). Measured on a loaded 2-core
 * machine, rows of 512 points, CPU time per cell: 15.3 ns (16 rows), 13.4 (8), 9.2 (4) for the kicked
 * forward pass, 9.6, 7.9 and 5.4 for the inverse with the density.
 */
const ROW_CHUNK = 4;

/** A grid a pass reaches besides the one it runs on: read before, written after. */
interface Operand {
  readonly name: string;
  readonly read: boolean;
  readonly write: boolean;
  /** Bytes per row of the pass's units. */
  readonly rowBytes: number;
}

export class BankedStepEngine extends EngineBase {
  /** Per bank: the engine and the regions it sees (moved offsets while a window stands in). */
  private readonly engines: WasmStepEngine[];
  private readonly local: Record<string, Region>[];
  /** Float64Array views of every bank. */
  private readonly words: Float64Array[];
  private readonly window: Region;
  private readonly row: number;
  private readonly part = new Float64Array(6);

  constructor(setup: StepSetup, slot: number) {
    super(setup);
    const banks = setup.banks!;
    // a bank's engine sees its own grids and the tables in its memory, and other banks' grids (for
    // views only: the kernels never get their offsets, see windowed) in their own buffers
    this.local = banks.map((_, b) => {
      const seen: Record<string, Region> = {};
      for (const [name, r] of Object.entries(setup.regions)) {
        seen[name] = r.bank === undefined || r.bank === b ? { ...r, bank: undefined } : { ...r, bank: undefined, buffer: banks[r.bank]!.buffer as SharedArrayBuffer };
      }
      return seen;
    });
    this.engines = banks.map((memory, b) => new WasmStepEngine({ ...setup, regions: this.local[b]!, memory, banks: undefined }, slot));
    this.words = banks.map((m) => new Float64Array(m.buffer));
    this.window = region(setup, windowName(slot));
    this.row = rowCells(setup.geometry);
  }

  private bank(name: string): number {
    return region(this.setup, name).bank!;
  }

  private on(name: string): WasmStepEngine {
    return this.engines[this.bank(name)]!;
  }

  /**
   * Run f over rows [lo, hi) on bank `bank`, with each operand of another bank in this thread's window,
   * a chunk of rows at a time (sum of f's results).
   */
  private windowed(bank: number, operands: readonly Operand[], lo: number, hi: number, f: (lo: number, hi: number) => number): number {
    const foreign = operands.filter((o) => this.bank(o.name) !== bank);
    if (foreign.length === 0) return f(lo, hi);
    const perRow = foreign.reduce((t, o) => t + o.rowBytes, 0);
    const chunk = Math.max(1, Math.floor((ELEMENT_BYTES[this.window.type] * this.window.length) / perRow));
    const here = this.words[bank]!;
    const seen = this.local[bank]!;
    const kept = foreign.map((o) => seen[o.name]!);
    let sum = 0;
    try {
      for (let r = lo; r < hi; r += chunk) {
        const e = Math.min(hi, r + chunk);
        let at = this.window.offset;
        for (const o of foreign) {
          const home = region(this.setup, o.name);
          seen[o.name] = { ...home, offset: at - r * o.rowBytes, bank: undefined };
          const from = (home.offset + r * o.rowBytes) / 8;
          if (o.read) here.set(this.words[home.bank!]!.subarray(from, from + ((e - r) * o.rowBytes) / 8), at / 8);
          at += (e - r) * o.rowBytes;
        }
        sum += f(r, e);
        at = this.window.offset;
        for (const o of foreign) {
          const home = region(this.setup, o.name);
          if (o.write) this.words[home.bank!]!.set(here.subarray(at / 8, (at + (e - r) * o.rowBytes) / 8), (home.offset + r * o.rowBytes) / 8);
          at += (e - r) * o.rowBytes;
        }
      }
    } finally {
      foreign.forEach((o, i) => (seen[o.name] = kept[i]!));
    }
    return sum;
  }

  /** A real grid's rows as an operand. */
  private real(name: string, read: boolean, write: boolean, cells = this.row): Operand {
    return { name, read, write, rowBytes: 8 * cells };
  }

  override fillPhases(set: number, factor: number): void {
    for (const e of this.engines) e.fillPhases(set, factor);
  }

  override kick(field: ComplexGrid, potential: RealGrid, factor: number, contact: number, source: ComplexGrid, lo: number, hi: number): void {
    const ops = [this.real(potential, true, false)];
    if (contact !== 0 && source !== field) ops.push({ name: source, read: true, write: false, rowBytes: 16 * this.row });
    const e = this.on(field);
    this.windowed(this.bank(field), ops, lo, hi, (a, b) => (e.kick(field, potential, factor, contact, source, a, b), 0));
  }

  override moments(lo: number, hi: number, out: Float64Array): void {
    const e = this.on("psi");
    const part = this.part;
    out.set([0, 0, 0, 0, Infinity, -Infinity]);
    this.windowed(this.bank("psi"), [this.real("phi", true, false)], lo, hi, (a, b) => {
      e.moments(a, b, part);
      for (let i = 0; i < 3; i++) out[i]! += part[i]!;
      out[3] = Math.max(out[3]!, part[3]!);
      out[4] = Math.min(out[4]!, part[4]!);
      out[5] = Math.max(out[5]!, part[5]!);
      return 0;
    });
  }

  override density(field: ComplexGrid, target: RealGrid, add: boolean, lo: number, hi: number): number {
    if (add) return super.density(field, target, add, lo, hi);
    const e = this.on(field);
    return this.windowed(this.bank(field), [this.real(target, false, true)], lo, hi, (a, b) => e.density(field, target, false, a, b));
  }

  axis(field: ComplexGrid, axis: number, inverse: boolean, lo: number, hi: number): void {
    this.on(field).axis(field, axis, inverse, lo, hi);
  }

  rows(field: ComplexGrid, inverse: boolean, kick: number, potential: RealGrid, density: boolean, contact: number, source: ComplexGrid, lo: number, hi: number): number {
    const ops: Operand[] = [];
    if (kick !== 0 || density) ops.push(this.real(potential, kick !== 0, density));
    if (kick !== 0 && contact !== 0 && source !== field) ops.push({ name: source, read: true, write: false, rowBytes: 16 * this.row });
    const e = this.on(field);
    return this.windowed(this.bank(field), ops, lo, hi, (a, b) => {
      let sum = 0;
      for (let r = a; r < b; r += ROW_CHUNK) sum += e.rows(field, inverse, kick, potential, density, contact, source, r, Math.min(b, r + ROW_CHUNK));
      return sum;
    });
  }

  driftOuter(field: ComplexGrid, phases: number, axis: number, lo: number, hi: number, gradient: boolean): number {
    return this.on(field).driftOuter(field, phases, axis, lo, hi, gradient);
  }

  /** The spectrum a Poisson target transforms into, and its real grid's name and row length. */
  private target(target: PoissonTarget, real: RealGrid): { spectrum: string; input: string; cells: number } {
    if (target === "periodic") return { spectrum: "spectrum", input: real, cells: this.shape[2] };
    return { spectrum: "iso.spectrum", input: "iso.work", cells: this.setup.geometry.padded![2] };
  }

  realRows(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void {
    const t = this.target(target, real);
    const e = this.on(t.spectrum);
    this.windowed(this.bank(t.spectrum), [this.real(t.input, true, false, t.cells)], lo, hi, (a, b) => (e.realRows(target, real, a, b), 0));
  }

  realRowsInverse(target: PoissonTarget, real: RealGrid, lo: number, hi: number): void {
    const t = this.target(target, real);
    const e = this.on(t.spectrum);
    this.windowed(this.bank(t.spectrum), [this.real(t.input, false, true, t.cells)], lo, hi, (a, b) => (e.realRowsInverse(target, real, a, b), 0));
  }

  halfAxis(target: PoissonTarget, axis: number, inverse: boolean, lo: number, hi: number): void {
    this.on(this.target(target, "phi").spectrum).halfAxis(target, axis, inverse, lo, hi);
  }

  poissonOuter(axis: number, lo: number, hi: number): void {
    this.on("spectrum").poissonOuter(axis, lo, hi);
  }

  longColumns(grid: ComplexGrid | RealGrid, inverse: boolean, lo: number, hi: number): void {
    this.on(grid).longColumns(grid, inverse, lo, hi);
  }

  longRows(grid: ComplexGrid | RealGrid, mode: LongRowsMode, phases: number, gradient: boolean, lo: number, hi: number): number {
    return this.on(grid).longRows(grid, mode, phases, gradient, lo, hi);
  }

  longPairs(real: RealGrid, lo: number, hi: number): void {
    this.on(real).longPairs(real, lo, hi);
  }
}
