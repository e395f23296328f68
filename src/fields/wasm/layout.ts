/**
 * The numbers the WebAssembly kernels and JavaScript share, declared once:
 * AssemblyScript compiles this file into the module (kernels.as.ts imports
 * it) and TypeScript into dist/ for the JavaScript side. The module also
 * exports them, and fields/wasm-kernels.ts compares on load, so a module
 * built from another version of this file is refused rather than misread.
 */

/** Pencils a pass transforms together in one scratch block; a strided pass's units are blocks of this many pencils. */
export const BLOCK = 16;

/** Byte address of the kernels' constants table (address 0 stays unused: a zero address means "absent"). */
export const CONSTANTS_ADDRESS = 64;

/** Bytes at the start of the memory left to the kernels; the step's regions start here. */
export const RESERVED_BYTES = 4096;

/** Bytes of twiddles per butterfly index of a radix-4 stage: six v128, (wʲ re, wʲ re) and (−wʲ im, wʲ im) for j = k, 2k, 3k. */
export const TWIDDLE_STRIDE = 96;

/** Byte alignment of every region of the step's memory (a cache line). */
export const REGION_ALIGN = 64;
