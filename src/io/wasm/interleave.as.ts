/**
 * ψ from its parts' rows in WebAssembly memory (see ../psi-wasm.ts):
 * ψ[2i] = re[i] and ψ[2i + 1] = im[i] for i < n, two cells a turn with
 * 128-bit SIMD. Float32 parts are widened exactly (every float32 is a
 * float64). Compiled by `npm run build:wasm` to dist/io/wasm/interleave.wasm.
 */

/** Float64 parts at `re` and `im` into ψ at `psi`: each pair of cells' four values by two shuffles of 64-bit lanes. */
export function interleave64(psi: usize, re: usize, im: usize, n: i32): void {
  const pairs = n & ~1;
  for (let i = 0; i < pairs; i += 2) {
    const a = v128.load(re + (<usize>i << 3));
    const b = v128.load(im + (<usize>i << 3));
    const at = psi + (<usize>i << 4);
    v128.store(at, i64x2.shuffle(a, b, 0, 2));
    v128.store(at, i64x2.shuffle(a, b, 1, 3), 16);
  }
  if (pairs < n) {
    store<f64>(psi + (<usize>pairs << 4), load<f64>(re + (<usize>pairs << 3)));
    store<f64>(psi + (<usize>pairs << 4), load<f64>(im + (<usize>pairs << 3)), 8);
  }
}

/** Float32 parts at `re` and `im` widened into ψ at `psi`: two values of each part loaded, promoted, shuffled. */
export function interleave32(psi: usize, re: usize, im: usize, n: i32): void {
  const pairs = n & ~1;
  for (let i = 0; i < pairs; i += 2) {
    const a = f64x2.promote_low_f32x4(v128.load64_zero(re + (<usize>i << 2)));
    const b = f64x2.promote_low_f32x4(v128.load64_zero(im + (<usize>i << 2)));
    const at = psi + (<usize>i << 4);
    v128.store(at, i64x2.shuffle(a, b, 0, 2));
    v128.store(at, i64x2.shuffle(a, b, 1, 3), 16);
  }
  if (pairs < n) {
    store<f64>(psi + (<usize>pairs << 4), <f64>load<f32>(re + (<usize>pairs << 2)));
    store<f64>(psi + (<usize>pairs << 4), <f64>load<f32>(im + (<usize>pairs << 2)), 8);
  }
}
