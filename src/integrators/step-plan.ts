/**
 * The plan of the step's passes for one grid geometry: which passes, in
 * which order, over how many units, for the drift, the Poisson solve and
 * the measurements. The stepper runs these lists and nothing else, and the
 * transforms whose tables and scratch the step's memory lays out follow from
 * them (`transforms`), so adding a pass to a list is the whole change.
 */
import { outerCount, PENCIL_BLOCK } from "../fields/fft.js";
import type { ComplexGrid, RealGrid } from "../fields/step-engine.js";
import type { StepGeometry, Transform } from "../fields/step-memory.js";
import { transformsOf, type StepTask } from "./step-task.js";

/** What a pass's summed result is, when the stepper keeps it. */
export type PassResult = "kinetic" | "mass";

/** One pass of a list: its task, its unit count and what its result means. */
export interface PlannedPass {
  readonly task: StepTask;
  readonly units: number;
  readonly result?: PassResult;
}

/** How a field's drift runs. */
export interface DriftOptions {
  /** The kick folded into the first pass (0: none). */
  readonly kick: number;
  /** The potential that kick multiplies by; with `density`, where |ψ|² goes. */
  readonly potential: RealGrid;
  /** Leave |ψ|² in `potential` after the drift (result "mass"). */
  readonly density: boolean;
  /** Measure Σ k²|ψ_k|² at the middle (result "kinetic"). */
  readonly gradient: boolean;
  /** The folded kick's contact coefficient (default 0) and the field whose |·|² it takes (default the drifted field). */
  readonly contact?: number;
  readonly source?: ComplexGrid;
}

/** The passes of one step geometry. */
export class StepPlan {
  readonly geometry: StepGeometry;
  /** Rows of the last axis. */
  readonly rows: number;
  /** The outermost simulated strided axis (0 or 1; −1 in 1D). */
  private readonly outer: number;
  /** A middle axis (1) to transform separately (3D, and 2D grids of shape n0 × 1 × n2 have none). */
  private readonly middle: boolean;

  constructor(geometry: StepGeometry) {
    this.geometry = geometry;
    const [n0, n1] = geometry.shape;
    this.rows = geometry.long ? geometry.long.n1 : n0 * n1;
    this.outer = n0 > 1 ? 0 : n1 > 1 ? 1 : -1;
    this.middle = this.outer === 0 && n1 > 1;
  }

  /**
   * ψ ← F⁻¹ e^{−ik²D/2} F ψ with the phase set `phases`: the last axis
   * first (it has at least 4 cells), then the middle axis, then the outer
   * axis fused with the phase, and back.
   */
  drift(field: ComplexGrid, phases: number, o: DriftOptions): PlannedPass[] {
    if (this.geometry.long) return this.longDrift(field, phases, o);
    const shape = this.geometry.shape;
    const contact = o.contact ?? 0;
    const source = o.source ?? field;
    // 3D: the last two axes plane by plane (each plane in cache for both); else the rows alone
    const op = this.middle ? "plane" : "rows";
    const units = this.middle ? shape[0] : this.rows;
    const passes: PlannedPass[] = [{ task: { op, field, inverse: false, kick: o.kick, potential: o.potential, density: false, contact, source }, units }];
    if (this.outer >= 0) {
      passes.push({ task: { op: "drift-outer", field, phases, axis: this.outer, gradient: o.gradient }, units: outerCount(shape, this.outer), result: "kinetic" });
    } else {
      if (o.gradient) passes.push({ task: { op: "gradient", field }, units: this.rows, result: "kinetic" });
      passes.push({ task: { op: "drift", field, phases }, units: this.rows });
    }
    passes.push({ task: { op, field, inverse: true, kick: 0, potential: o.potential, density: o.density, contact: 0, source }, units, result: o.density ? "mass" : undefined });
    return passes;
  }

  /**
   * A long 1D grid's drift (fields/step-memory.ts LongLayout): the kick, the
   * columns, the rows with the phase between their transforms, the columns
   * back, the density.
   */
  private longDrift(field: ComplexGrid, phases: number, o: DriftOptions): PlannedPass[] {
    const passes: PlannedPass[] = [];
    if (o.kick !== 0) passes.push({ task: { op: "kick", field, potential: o.potential, factor: o.kick, contact: o.contact ?? 0, source: o.source ?? field }, units: this.rows });
    passes.push(this.longColumns(field, false));
    passes.push({ task: { op: "long-rows", grid: field, mode: "drift", phases, gradient: o.gradient }, units: this.rows, result: "kinetic" });
    passes.push(this.longColumns(field, true));
    if (o.density) passes.push({ task: { op: "density", field, target: o.potential, add: false }, units: this.rows, result: "mass" });
    return passes;
  }

  /** A long grid's pass over its columns: of a field's matrix, or of a real grid's half-length one. */
  private longColumns(grid: ComplexGrid | RealGrid, inverse: boolean): PlannedPass {
    return { task: { op: "long-columns", grid, inverse }, units: Math.ceil(this.geometry.long!.n2 / PENCIL_BLOCK) };
  }

  /** A long grid's periodic potential: the density's four-step transform, the kernel on pairs of wavenumbers, and back. */
  private longPotential(real: RealGrid): PlannedPass[] {
    const rows = this.geometry.long!.n1 / 2;
    const longRows = (mode: "forward" | "inverse"): PlannedPass => ({ task: { op: "long-rows", grid: real, mode, phases: 0, gradient: false }, units: rows });
    return [
      this.longColumns(real, false),
      longRows("forward"),
      { task: { op: "long-pairs", real }, units: rows / 2 + 1 },
      longRows("inverse"),
      this.longColumns(real, true),
    ];
  }

  /** The potential of the density in `real`, written back into `real` (none for gravity "none": the stepper zeroes it). */
  potential(real: RealGrid): PlannedPass[] {
    const g = this.geometry;
    if (g.long && g.gravity === "periodic") return this.longPotential(real);
    if (g.gravity === "periodic") return this.periodicPotential(real);
    if (g.gravity === "isolated") return this.isolatedPotential(real);
    return [];
  }

  private periodicPotential(real: RealGrid): PlannedPass[] {
    const half = this.geometry.half;
    const outer: PlannedPass = this.outer >= 0 ? { task: { op: "poisson-outer", axis: this.outer }, units: outerCount(half, this.outer) } : { task: { op: "poisson" }, units: this.rows };
    if (this.middle) {
      // 3D: the real rows and axis 1 plane by plane, as the drift's
      const plane = (inverse: boolean): PlannedPass => ({ task: { op: "real-plane", real, inverse }, units: half[0] });
      return [plane(false), outer, plane(true)];
    }
    return [{ task: { op: "real-rows", target: "periodic", real }, units: this.rows }, outer, { task: { op: "real-rows-inverse", target: "periodic", real }, units: this.rows }];
  }

  /**
   * Free-space convolution on the zero-padded grid (as IsolatedPoisson.solveInPlace),
   * transforming only what is not zero on the way in and only what is kept on the way out.
   */
  private isolatedPotential(real: RealGrid): PlannedPass[] {
    const [n0, n1] = this.geometry.shape;
    const [p0, p1] = this.geometry.padded!;
    const half = this.geometry.paddedHalf!;
    const paddedRows = p0 * p1;
    const outer = p0 > 1 ? 0 : p1 > 1 ? 1 : -1;
    const both = p0 > 1 && p1 > 1;
    // along axis 1, pencils with a ≥ n0 (the units from n0 · blocks on) are zero in and unused out
    const middle = (inverse: boolean): PlannedPass => ({ task: { op: "half-axis", target: "isolated", axis: 1, inverse }, units: outerCount([n0, p1, half[2]], 1) });
    const outerPass = (inverse: boolean): PlannedPass => ({ task: { op: "half-axis", target: "isolated", axis: outer, inverse }, units: outerCount(half, outer) });
    const passes: PlannedPass[] = [
      { task: { op: "isolated-rows", real }, units: n0 * n1 },
      { task: { op: "isolated-zero" }, units: paddedRows },
    ];
    if (both) passes.push(middle(false));
    if (outer >= 0) passes.push(outerPass(false));
    passes.push({ task: { op: "convolve" }, units: paddedRows });
    if (outer >= 0) passes.push(outerPass(true));
    if (both) passes.push(middle(true));
    passes.push({ task: { op: "isolated-rows-inverse", real }, units: n0 * n1 });
    return passes;
  }

  /** Σ k²|ψ_k|² of `field` (result "kinetic"): a copy into `scratch`, its forward transform, the sum. */
  kinetic(field: ComplexGrid, scratch: ComplexGrid): PlannedPass[] {
    if (this.geometry.long) {
      const forward: PlannedPass = { task: { op: "long-rows", grid: scratch, mode: "forward", phases: 0, gradient: true }, units: this.rows, result: "kinetic" };
      return [this.copy(field, scratch), this.longColumns(scratch, false), forward];
    }
    const shape = this.geometry.shape;
    const passes: PlannedPass[] = [this.copy(field, scratch), { task: { op: "rows", field: scratch, inverse: false, kick: 0, potential: "phi", density: false, contact: 0, source: scratch }, units: this.rows }];
    for (const axis of [1, 0]) if (shape[axis]! > 1) passes.push({ task: { op: "axis", field: scratch, axis, inverse: false }, units: outerCount(shape, axis) });
    passes.push({ task: { op: "gradient", field: scratch }, units: this.rows, result: "kinetic" });
    return passes;
  }

  /** Copy a complex grid. */
  copy(from: ComplexGrid, to: ComplexGrid): PlannedPass {
    return { task: { op: "copy", from, to }, units: this.rows };
  }

  /** Every transform the lists above run, for the tables and scratch of the step's memory. */
  transforms(): Transform[] {
    const all = [
      ...this.drift("psi", 0, { kick: 1, potential: "phi", density: true, gradient: true }),
      ...this.potential("phi"),
      ...this.kinetic("psi", "undo"),
    ];
    return all.flatMap((p) => transformsOf(p.task, this.geometry));
  }
}
