/**
 * A region of the box as people write it, the one parser for every place
 * that takes one (`psibox clocks --region/--center/--radius`, the
 * `[breakdown]` keys region, region_center, region_radius): its kind (box,
 * sphere, cube, or densest: a sphere around the densest cell), its centre
 * (one length per simulated axis, inside the box) and its radius (a cube's
 * half-width), in code lengths.
 */
import { parseAs, UnitSyntaxError, type UnitContext } from "../physics/units.js";
import { PC_M } from "../physics/constants.js";

/** A region in code lengths, one centre coordinate per simulated axis. */
export type Region =
  | { readonly kind: "box" }
  | { readonly kind: "sphere"; readonly center: readonly number[]; readonly radius: number }
  | { readonly kind: "cube"; readonly center: readonly number[]; readonly halfWidth: number }
  | { readonly kind: "densest"; readonly radius: number };

export const REGION_KINDS = ["box", "sphere", "cube", "densest"] as const;

/** The region as written: its kind, centre lengths and radius, with the names the user gave them. */
export interface RegionText {
  readonly kind: string;
  readonly center?: readonly string[] | undefined;
  readonly radius?: string | undefined;
  /** A sphere or cube without a centre sits at the middle of the box (otherwise the centre is required). */
  readonly middleByDefault?: boolean;
  /** Names of the three settings in messages, e.g. "--region", "--center", "--radius". */
  readonly names: { readonly kind: string; readonly center: string; readonly radius: string };
}

/** The box it lies in: its side lengths in code lengths (simulated axes) and metres per code length. */
export interface RegionBox {
  readonly lengths: readonly number[];
  readonly lengthM: number;
  /** How unit expressions are read (e.g. kpc/h needs h). */
  readonly units?: UnitContext;
}

const KPC_M = 1e3 * PC_M;

function lengthOf(name: string, text: string, fail: (key: string, message: string) => Error, units: UnitContext = {}): number {
  try {
    return parseAs(text, "length", units);
  } catch (e) {
    if (e instanceof UnitSyntaxError) throw fail(name, e.message);
    throw e;
  }
}

/** Parse and check a region (`fail` makes the error for a setting and a message: one line, exit code 2). */
export function parseRegion(text: RegionText, box: RegionBox, fail: (key: string, message: string) => Error): Region {
  const { names } = text;
  if (!(REGION_KINDS as readonly string[]).includes(text.kind)) throw fail(names.kind, `must be box, sphere, cube or densest, got "${text.kind}"`);
  if (text.kind === "box") return { kind: "box" };
  if (text.radius === undefined) throw fail(names.radius, `needed with ${names.kind} ${text.kind}`);
  const r = lengthOf(names.radius, text.radius, fail, box.units) / box.lengthM;
  if (!(r > 0) || !Number.isFinite(r)) throw fail(names.radius, "must be a positive length");
  const smallest = Math.min(...box.lengths);
  if (r > smallest / 2) throw fail(names.radius, `must be at most half the box's smallest side (${((smallest / 2) * (box.lengthM / KPC_M)).toPrecision(4)} kpc); for the whole box use ${names.kind} box`);
  if (text.kind === "densest") return { kind: "densest", radius: r };
  if (text.center === undefined && !text.middleByDefault) throw fail(names.center, `needed with ${names.kind} ${text.kind}, one length per axis`);
  const c = text.center === undefined ? box.lengths.map((l) => l / 2) : text.center.map((t) => lengthOf(names.center, t.trim(), fail, box.units) / box.lengthM);
  if (c.length !== box.lengths.length) throw fail(names.center, `give ${box.lengths.length} lengths (one per axis), got ${c.length}`);
  c.forEach((v, i) => {
    const side = box.lengths[i]!;
    if (!(v >= 0 && v <= side)) throw fail(names.center, `lies outside the box on axis ${i + 1} (0 … ${((side * box.lengthM) / KPC_M).toPrecision(4)} kpc)`);
  });
  return text.kind === "sphere" ? { kind: "sphere", center: c, radius: r } : { kind: "cube", center: c, halfWidth: r };
}
