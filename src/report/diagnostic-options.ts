/**
 * Which field diagnostics `psibox analyze` computes, with the Husimi window
 * and points, checked against a snapshot's grid (one-line errors naming the
 * option and what is valid).
 */
import { InputError } from "../core/errors.js";
import type { HaloRequest } from "./halo-tables.js";

/** The field diagnostics by name. */
export const FIELD_DIAGNOSTICS = ["energy-split", "vortices", "granules", "husimi"] as const;
export type FieldDiagnostic = (typeof FIELD_DIAGNOSTICS)[number];

/** What the user asked for (physical units: kpc, comoving in comoving runs). */
export interface DiagnosticRequest {
  /** Diagnostics by name; undefined: every one that applies to the run's dimension. */
  readonly only?: readonly FieldDiagnostic[];
  /** Husimi window η [kpc]; undefined: the default √(L Δx/4π). */
  readonly husimiWindowKpc?: number;
  /** Points for the momentum distribution [kpc], one coordinate per axis; undefined: the densest point. */
  readonly husimiPointsKpc?: readonly (readonly number[])[];
  /** The halo catalogue's definition and smallest mass; undefined: 200m and halos of at least 2 cells' radius. */
  readonly halos?: HaloRequest;
}

/** Parse `--diagnostics a,b` (or "none"). */
export function parseDiagnosticList(text: string): FieldDiagnostic[] {
  if (text.trim() === "none") return [];
  const names = text.split(",").map((s) => s.trim()).filter((s) => s.length > 0);
  for (const n of names) {
    if (!(FIELD_DIAGNOSTICS as readonly string[]).includes(n)) throw new InputError(`--diagnostics: unknown diagnostic "${n}"; valid: ${FIELD_DIAGNOSTICS.join(", ")} or none`);
  }
  return names as FieldDiagnostic[];
}

/** Parse `--husimi-points "x,y;x,y"` [kpc]. */
export function parseHusimiPoints(text: string): number[][] {
  const points = text.split(";").map((p) => p.split(",").map((v) => Number(v.trim())));
  if (points.length === 0 || points.some((p) => p.length === 0 || p.some((v) => !Number.isFinite(v)))) {
    throw new InputError(`--husimi-points: "${text}" is not a list of points in kpc such as "1.5,2;3,4.25" (one coordinate per axis, points separated by ";")`);
  }
  return points;
}

/** The diagnostics that apply to a run of `dims` dimensions, or an error for one that does not. */
export function checkDiagnostics(request: DiagnosticRequest, dims: number, boxKpc: readonly number[], cellsPerAxis: readonly number[], file: string): Set<FieldDiagnostic> {
  const chosen = new Set<FieldDiagnostic>(request.only ?? FIELD_DIAGNOSTICS.filter((d) => d !== "vortices" || dims >= 2));
  if (dims === 1 && request.only?.includes("vortices")) throw new InputError(`--diagnostics: vortices need a 2D or 3D run, ${file} is 1D (valid for it: energy-split, granules, husimi)`);
  if (dims === 1 && request.husimiPointsKpc) throw new InputError(`--husimi-points: ${file} is a 1D run, whose Husimi distribution is drawn whole over x and v; points are for 2D and 3D runs`);
  const cell = Math.max(...boxKpc.map((l, i) => l / cellsPerAxis[i]!));
  const maxWindow = Math.min(...boxKpc) / 16;
  const eta = request.husimiWindowKpc;
  if (eta !== undefined && !(eta >= cell * (1 - 1e-12) && eta <= maxWindow * (1 + 1e-12))) {
    throw new InputError(`--husimi-window: ${Number(eta.toPrecision(6))} kpc is ${eta < cell ? "smaller than a cell" : "too wide for the box (its ±8η support must fit)"}; valid for ${file}: ${cell.toPrecision(4)} to ${maxWindow.toPrecision(4)} kpc`);
  }
  for (const p of request.husimiPointsKpc ?? []) {
    if (p.length !== dims) throw new InputError(`--husimi-points: the point ${p.join(",")} has ${p.length} coordinates; ${file} is ${dims}D`);
    p.forEach((v, i) => {
      if (!(v >= 0 && v < boxKpc[i]!)) throw new InputError(`--husimi-points: the point ${p.join(",")} is outside the box of ${file} (axis ${i + 1} runs from 0 to ${boxKpc[i]!.toPrecision(6)} kpc)`);
    });
  }
  return chosen;
}
