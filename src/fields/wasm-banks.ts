/**
 * Grids too large for one 4 GiB WebAssembly memory (a 512³ step holds about
 * 6 GiB) are spread over several memories, "banks": every bank starts with
 * the same block of tables, kernel scratch and one copy window per thread, at
 * the same offsets in every bank, and then holds some of the grids (ψ, φ,
 * the undo copy, the Poisson spectrum, …), each grid whole in one bank. Each
 * thread instantiates the kernels once per bank. A pass whose grids all live
 * in one bank runs there in place, as in the single memory; a pass that
 * reads or writes a grid of another bank (φ for the Poisson spectrum's real
 * rows, say) copies that grid's rows through the thread's window in chunks
 * (fields/banked-step-engine.ts). The kernels compute each cell the same
 * way whatever memory it sits in, so a banked step gives the same field bit
 * for bit as one memory would.
 *
 * Grids go to banks first fit, in the order of the table, so ψ and φ (the
 * kick, the density, the moments) share the first bank, and at 512³ the undo
 * copy and the spectrum the second.
 */
import { REGION_ALIGN, RESERVED_BYTES } from "./wasm/layout.js";
import {
  ELEMENT_BYTES,
  isGridRegion,
  rowCells,
  stepRegions,
  WASM_MAX_BYTES,
  WASM_PAGE,
  wasmLayout,
  type RegionSpec,
  type StepGeometry,
  type Transform,
} from "./step-memory.js";

/** Bytes of a thread's copy window in each bank: a chunk of rows of the grids a pass reaches in other banks. */
export const WINDOW_BYTES = 1 << 19;

/** The name of a thread's copy window (in every bank). */
export const windowName = (slot: number) => `window.${slot}`;

/** Test-only: banks of at most `gridBytes` of grids each (forcing banks on small grids) and windows of `windowBytes`. */
let forced: { readonly gridBytes: number; readonly windowBytes: number } | undefined;

/** Force banks on any grid, with at most `gridBytes` of grids per bank and windows of `windowBytes` (tests); no argument: the default. */
export function setWasmBanks(o?: { readonly gridBytes: number; readonly windowBytes: number }): void {
  forced = o;
}

/** A banked layout: each region's offset and bank (undefined: in every bank), and each bank's size in bytes. */
export interface BankLayout {
  readonly specs: readonly RegionSpec[];
  readonly offsets: readonly number[];
  readonly banks: readonly (number | undefined)[];
  readonly sizes: readonly number[];
  /** Bytes of a window. */
  readonly windowBytes: number;
}

/** Whether the wasm backend must bank a step whose one memory would take `total` bytes. */
export function needsBanks(total: number): boolean {
  return forced !== undefined || total > WASM_MAX_BYTES;
}

const aligned = (bytes: number) => Math.ceil(bytes / REGION_ALIGN) * REGION_ALIGN;

/**
 * Lay out the regions (the step's table, wasm-only ones included) over banks, plus a window per thread
 * that holds at least 32 bytes per cell of a row of `rowCells` (a row of a real and a complex grid, or of
 * the isolated solve's padded real grid); undefined when a single grid does not fit one bank.
 */
export function bankedLayout(table: readonly RegionSpec[], slots: number, rowCells: number): BankLayout | undefined {
  const windowBytes = Math.max(forced?.windowBytes ?? WINDOW_BYTES, aligned(32 * rowCells));
  const windows: RegionSpec[] = Array.from({ length: slots }, (_, slot) => ({ name: windowName(slot), type: "complex", length: windowBytes / 16, wasmOnly: true }));
  const specs = [...table, ...windows];
  const offsets: number[] = [];
  const banks: (number | undefined)[] = [];
  let top = RESERVED_BYTES;
  specs.forEach((s, i) => {
    if (isGridRegion(s.name)) return;
    offsets[i] = top;
    top += aligned(ELEMENT_BYTES[s.type] * s.length);
  });
  const shared = top;
  const capacity = forced?.gridBytes ?? Math.floor((WASM_MAX_BYTES - shared) / WASM_PAGE) * WASM_PAGE;
  const used: number[] = [];
  for (const [i, s] of specs.entries()) {
    if (!isGridRegion(s.name)) continue;
    const bytes = aligned(ELEMENT_BYTES[s.type] * s.length);
    if (bytes > capacity) return undefined;
    let bank = used.findIndex((u) => u + bytes <= capacity);
    if (bank < 0) bank = used.push(0) - 1;
    offsets[i] = shared + used[bank]!;
    banks[i] = bank;
    used[bank]! += bytes;
  }
  return { specs, offsets, banks, sizes: used.map((u) => shared + u), windowBytes };
}

/** Bytes of all banks of a layout (what the banked wasm backend allocates). */
export function bankedBytes(layout: BankLayout): number {
  return layout.sizes.reduce((t, s) => t + Math.ceil(s / WASM_PAGE) * WASM_PAGE, 0);
}

/** Bytes the wasm backend allocates for a step: one memory, or its banks; undefined when a single grid exceeds a bank. */
export function wasmStepBytes(g: StepGeometry, transforms: readonly Transform[], slots: number): number | undefined {
  const table = stepRegions(g, transforms, slots);
  const total = wasmLayout(table).total;
  if (!needsBanks(total)) return total;
  const layout = bankedLayout(table, slots, rowCells(g));
  return layout && bankedBytes(layout);
}
