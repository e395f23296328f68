/**
 * ψ in WebAssembly memory, so that a small SIMD kernel (wasm/interleave.as.ts)
 * interleaves its parts' rows, and widens float32 ones, two cells a turn: on a
 * 128³ field 1.2–1.4 ms where the JavaScript loop of psi-interleave.ts takes
 * 3.1–3.4 ms (one thread, measured on a shared machine). Such a memory holds,
 * after its first page, each reading thread's buffers for its rows (the file's
 * bytes are read there and the kernel takes them from the cache), then ψ. A
 * read into any other array uses the JavaScript loop: the values are the same
 * bit for bit.
 */
import fs from "node:fs";
import { fileURLToPath } from "node:url";
import { READ_BYTES, type ReadBuffers, type Take } from "./row-read.js";

/** A memory holding ψ: where reading thread `slot`'s buffer for part `i` starts is `HEAD + (2 slot + i) partBytes`. */
export interface PsiMemory {
  readonly memory: WebAssembly.Memory;
  readonly partBytes: number;
}

/** The reading threads that have buffers in such a memory: the main thread (0) and the reading thread (1). */
export const SLOTS = 2;
/** Bytes before the buffers: the module's first page, which it leaves unused. */
const HEAD = 65536;
const PAGE = 65536;
/** A WebAssembly memory's largest size (32-bit addresses). */
const MAX_PAGES = 65536;

interface Kernels {
  interleave64(psi: number, re: number, im: number, n: number): void;
  interleave32(psi: number, re: number, im: number, n: number): void;
}

let compiled: WebAssembly.Module | null | undefined;

/** The compiled kernel (next to this file when built, in dist/ from the sources), or null where it cannot load. */
function kernelModule(): WebAssembly.Module | null {
  if (compiled === undefined) {
    const built = fileURLToPath(new URL("./wasm/interleave.wasm", import.meta.url));
    const file = fs.existsSync(built) ? built : fileURLToPath(new URL("../../dist/io/wasm/interleave.wasm", import.meta.url));
    try {
      compiled = new WebAssembly.Module(fs.readFileSync(file));
    } catch {
      compiled = null;
    }
  }
  return compiled;
}

/** The memories that ψs read into new memory lie in, by their buffer. */
const memories = new WeakMap<ArrayBufferLike, PsiMemory>();

/** A new ψ of `length` values (rows of `rowValues` cells) in a memory of its own, or undefined where none can be made. */
export function newWasmPsi(length: number, rowValues: number): Float64Array | undefined {
  if (!kernelModule()) return undefined;
  const partBytes = Math.ceil(Math.max(READ_BYTES, 8 * rowValues) / 64) * 64;
  const psiAt = HEAD + 2 * SLOTS * partBytes;
  const pages = Math.ceil((psiAt + 8 * length) / PAGE);
  if (pages > MAX_PAGES) return undefined;
  let memory: WebAssembly.Memory;
  try {
    memory = new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
  } catch {
    return undefined;
  }
  const buffer = memory.buffer;
  memories.set(buffer, { memory, partBytes });
  return new Float64Array(buffer, psiAt, length);
}

/** The memory `psi` lies in when it was made by newWasmPsi. */
export function psiMemoryOf(psi: Float64Array): PsiMemory | undefined {
  return memories.get(psi.buffer);
}

/** The kernel's instances on the memories of this thread (a reading thread gets a new memory object with each job). */
const instances = new WeakMap<WebAssembly.Memory, Kernels>();

/** The kernel on `memory` (made once per memory object), or undefined where it cannot be made. */
function kernelsOn(module: WebAssembly.Module, memory: WebAssembly.Memory): Kernels | undefined {
  let k = instances.get(memory);
  if (!k) {
    try {
      k = new WebAssembly.Instance(module, { env: { memory } }).exports as unknown as Kernels;
    } catch {
      return undefined;
    }
    instances.set(memory, k);
  }
  return k;
}

/**
 * What reading thread `slot` reads ψ's rows with (rows of `rowValues` cells, `step` at a time, values of `size`
 * bytes) when ψ lies in `at`: the buffers in that memory and the kernel taking them into ψ; undefined where the
 * rows do not fit the buffers or the kernel cannot be made.
 */
export function wasmReading(at: PsiMemory, psi: Float64Array, rowValues: number, step: number, size: number, slot: number): { buffers: ReadBuffers; take: Take } | undefined {
  const module = kernelModule();
  if (!module || step * rowValues * size > at.partBytes) return undefined;
  const k = kernelsOn(module, at.memory);
  if (!k) return undefined;
  const buffer = at.memory.buffer;
  const buffers = [0, 1].map((i) => ({ buffer, byteOffset: HEAD + (2 * slot + i) * at.partBytes }));
  const into = size === 8 ? k.interleave64 : k.interleave32;
  const psiAt = psi.byteOffset;
  return { buffers, take: (r0, _r1, [re, im]) => into(psiAt + 16 * r0 * rowValues, re!.byteOffset, im!.byteOffset, re!.length) };
}
