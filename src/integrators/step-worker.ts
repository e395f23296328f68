/**
 * A worker thread of the threaded split-step: it holds its own FFT plans and
 * runs row ranges of the step's passes on the shared ψ, φ and spectrum
 * buffers, then counts down the shared counter the main thread waits on.
 */
import { parentPort, workerData } from "node:worker_threads";
import { ComplexFft, RealFft } from "../fields/fft.js";
import { densityRows, driftRows, gradientNormRows, kickRows, poissonRows } from "../fields/step-kernels.js";
import type { Triple } from "../grid/grid.js";
import type { StepTask, WorkerSetup } from "./thread-pool.js";

const setup = workerData as WorkerSetup;
const shape = setup.shape as Triple;
const psi = new Float64Array(setup.psi);
const phi = new Float64Array(setup.phi);
const spec = setup.spectrum ? new Float64Array(setup.spectrum) : undefined;
const phase = new Float64Array(setup.phase);
const results = new Float64Array(setup.results);
const ctrl = new Int32Array(setup.control);
const [n0, n1, n2] = shape;
const p0 = phase.subarray(0, 2 * n0);
const p1 = phase.subarray(2 * n0, 2 * (n0 + n1));
const p2 = phase.subarray(2 * (n0 + n1), 2 * (n0 + n1 + n2));
const k = setup.wavenumbers.map((a) => Float64Array.from(a));
const k2 = setup.kSquared?.map((a) => Float64Array.from(a));
const cfft = new ComplexFft(shape);
const rfft = spec ? new RealFft(shape) : undefined;

function run(t: StepTask): void {
  switch (t.op) {
    case "kick":
      kickRows(psi, phi, t.factor, n2, t.lo, t.hi);
      return;
    case "axis":
      cfft.pass(psi, t.axis, t.inverse, t.lo, t.hi);
      return;
    case "drift":
      driftRows(psi, shape, p0, p1, p2, t.lo, t.hi);
      return;
    case "gradient":
      results[t.slot] = gradientNormRows(psi, shape, k[0]!, k[1]!, k[2]!, t.lo, t.hi);
      return;
    case "density":
      results[t.slot] = densityRows(psi, phi, n2, t.lo, t.hi);
      return;
    case "rfft-rows":
      rfft!.forwardRows(phi, spec!, t.lo, t.hi);
      return;
    case "half-axis":
      rfft!.outerPass(spec!, t.axis as 0 | 1, t.inverse, t.lo, t.hi);
      return;
    case "poisson":
      poissonRows(spec!, rfft!.halfShape, k2![0]!, k2![1]!, k2![2]!, t.lo, t.hi);
      return;
    case "irfft-rows":
      rfft!.inverseRows(spec!, phi, t.lo, t.hi);
      return;
  }
}

parentPort!.on("message", (task: StepTask) => {
  try {
    run(task);
  } catch {
    Atomics.store(ctrl, 1, 1);
  } finally {
    Atomics.sub(ctrl, 0, 1);
    Atomics.notify(ctrl, 0);
  }
});
