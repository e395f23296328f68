/**
 * Allocating the step's memory from its table of regions (fields/step-memory.ts)
 * and filling its tables: k² per axis, the Poisson kernel, the isolated
 * solve's Green's function, a long 1D grid's four-step twiddles, and for the wasm backend the kernels' constants,
 * twiddles, bit-reversal permutations and real-row twiddles.
 */
import {
  ELEMENT_BYTES,
  LONG_FINE_ROWS,
  regionInts,
  regionName,
  regionView,
  rowCells,
  scratchBytes,
  stepRegions,
  WASM_MAX_BYTES,
  WASM_PAGE,
  wasmLayout,
  type FftBackend,
  type Region,
  type RegionSpec,
  type StepGeometry,
  type StepSetup,
  type Transform,
} from "./step-memory.js";
import { fillBitReversal, fillTwiddles, instantiateKernels, kernelModule } from "./wasm-kernels.js";
import { bankedLayout, needsBanks, type BankLayout } from "./wasm-banks.js";

/** What the tables are filled from. */
export interface TableInputs {
  /** k² per index along axes 0, 1, 2. */
  readonly kSquared: readonly Float64Array[];
  /** The periodic Poisson kernel's k² along axes 0, 1 and the half axis 2. */
  readonly kPoisson?: readonly Float64Array[];
  /** The isolated solve's Green's function transform on the padded half spectrum. */
  readonly isolatedHat?: Float64Array;
}

/** What the stepper is given back: the layout and views of the regions it reads on this thread. */
export interface StepMemory {
  readonly setup: StepSetup;
  readonly psi: Float64Array;
  readonly phi: Float64Array;
  readonly undo: Float64Array;
  readonly spectrum: Float64Array | undefined;
}

/**
 * Lay out and allocate the step's memory, and fill its tables.
 * @param transforms every transform the step's plan runs (they set the wasm tables and scratch)
 * @param slots threads that will run kernels (the wasm backend gives each a scratch block)
 */
export function allocateStepMemory(backend: FftBackend, g: StepGeometry, transforms: readonly Transform[], tables: TableInputs, slots: number): StepMemory {
  const setup = allocateRegions(backend, g, stepRegions(g, transforms, slots), transforms, tables);
  const regions = setup.regions;
  return {
    setup,
    psi: regionView(setup, "psi"),
    phi: regionView(setup, "phi"),
    undo: regionView(setup, "undo"),
    spectrum: regions.spectrum ? regionView(setup, "spectrum") : undefined,
  };
}

/**
 * Allocate the regions of a table (those marked wasm-only for the wasm
 * backend only) and fill the tables; returns the layout every thread builds
 * its engine from.
 */
export function allocateRegions(backend: FftBackend, g: StepGeometry, table: readonly RegionSpec[], transforms: readonly Transform[], tables: TableInputs): StepSetup {
  const specs = table.filter((s) => backend === "wasm" || !s.wasmOnly);
  const regions: Record<string, Region> = {};
  let memory: WebAssembly.Memory | undefined;
  if (backend === "js") {
    for (const s of specs) regions[s.name] = { offset: 0, type: s.type, length: s.length, buffer: new SharedArrayBuffer(ELEMENT_BYTES[s.type] * s.length) };
  } else {
    if (!kernelModule()) throw new Error("the wasm FFT backend is not available");
    const { offsets, total } = wasmLayout(specs);
    if (needsBanks(total)) return allocateBanks(g, specs, transforms, tables);
    const pages = Math.ceil(total / WASM_PAGE);
    memory = new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
    specs.forEach((s, i) => (regions[s.name] = { offset: offsets[i]!, type: s.type, length: s.length }));
  }
  const setup: StepSetup = { backend, geometry: g, regions, memory, scratchBytes: backend === "wasm" ? scratchBytes(transforms) : 0 };
  fillTables(setup, tables);
  if (backend === "wasm") fillKernelTables(setup, transforms);
  return setup;
}

/** The wasm backend on banks (fields/wasm-banks.ts): the tables filled in the first bank and copied to the others. */
function allocateBanks(g: StepGeometry, specs: readonly RegionSpec[], transforms: readonly Transform[], tables: TableInputs): StepSetup {
  const slots = specs.filter((s) => s.name.startsWith("scratch.")).length;
  const layout = bankedLayout(specs, slots, rowCells(g));
  if (!layout) throw new RangeError(`the wasm FFT backend cannot place a grid of ${g.shape.join("×")} in a 4 GiB WebAssembly memory`);
  const banks = layout.sizes.map((bytes) => {
    if (bytes > WASM_MAX_BYTES) throw new RangeError(`a wasm memory of ${bytes} bytes is more than 4 GiB`);
    const pages = Math.ceil(bytes / WASM_PAGE);
    return new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
  });
  const regions: Record<string, Region> = {};
  layout.specs.forEach((s, i) => (regions[s.name] = { offset: layout.offsets[i]!, type: s.type, length: s.length, bank: layout.banks[i] }));
  const setup: StepSetup = { backend: "wasm", geometry: g, regions, memory: banks[0], banks, scratchBytes: scratchBytes(transforms) };
  fillTables(setup, tables);
  fillKernelTables(setup, transforms);
  copySharedBlock(layout, banks);
  return setup;
}

/** Copy the block every bank shares (the kernels' constants, tables, scratch) from the first bank to the others. */
function copySharedBlock(layout: BankLayout, banks: readonly WebAssembly.Memory[]): void {
  const end = Math.max(...layout.specs.map((s, i) => (layout.banks[i] === undefined ? layout.offsets[i]! + ELEMENT_BYTES[s.type] * s.length : 0)));
  const first = new Uint8Array(banks[0]!.buffer, 0, end);
  for (const bank of banks.slice(1)) new Uint8Array(bank.buffer, 0, end).set(first);
}

function fillTables(setup: StepSetup, tables: TableInputs): void {
  for (let axis = 0; axis < 3; axis++) {
    regionView(setup, regionName.kSquared(axis)).set(tables.kSquared[axis]!);
    if (setup.geometry.gravity === "periodic") regionView(setup, regionName.kPoisson(axis)).set(tables.kPoisson![axis]!);
  }
  if (setup.geometry.gravity === "isolated") regionView(setup, "iso.hat").set(tables.isolatedHat!);
  if (setup.geometry.long) fillLongTwiddles(regionView(setup, regionName.longTwiddles), setup.geometry.long.n1, setup.geometry.long.n2);
}

/** A long grid's twiddle table (step-memory.ts longTwiddleRows): coarse rows e^{−2πi·16c·j/N}, then fine rows e^{−2πi·f·j/N}. */
function fillLongTwiddles(out: Float64Array, n1: number, n2: number): void {
  const n = n1 * n2;
  const multipliers = [...Array.from({ length: n1 / 16 }, (_, c) => 16 * c), ...Array.from({ length: LONG_FINE_ROWS }, (_, f) => f)];
  multipliers.forEach((a, row) => {
    for (let j = 0; j < n2; j++) {
      // the exact residue of a·j mod N keeps the angle below 2π
      const angle = (2 * Math.PI * ((a * j) % n)) / n;
      out[2 * (row * n2 + j)] = Math.cos(angle);
      out[2 * (row * n2 + j) + 1] = -Math.sin(angle);
    }
  });
}

function fillKernelTables(setup: StepSetup, transforms: readonly Transform[]): void {
  instantiateKernels(kernelModule()!, setup.memory!).initConstants();
  for (const n of new Set(transforms.map((t) => t.n))) {
    if (n < 2) continue;
    fillTwiddles(regionView(setup, regionName.twiddles(n, false)), n, false);
    fillTwiddles(regionView(setup, regionName.twiddles(n, true)), n, true);
    fillBitReversal(regionInts(setup, regionName.reversal(n)), n);
  }
  for (const n of new Set(transforms.map((t) => t.realRow).filter((n) => n > 0))) {
    const ctw = regionView(setup, regionName.realTwiddles(n));
    for (let k = 0; k <= n / 2; k++) {
      ctw[2 * k] = Math.cos((2 * Math.PI * k) / n);
      ctw[2 * k + 1] = Math.sin((2 * Math.PI * k) / n);
    }
  }
}
