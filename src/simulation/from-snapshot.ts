/**
 * Rebuild a grid, background, Poisson solver and code-unit field from a
 * snapshot alone, so the same diagnostics run on live state and on files.
 */
import { contactOfConfigText } from "../config/resolve-contact.js";
import { contactCode } from "../physics/contact.js";
import { Grid } from "../grid/grid.js";
import { makePoissonSolver, type GravityKind, type PoissonSolver } from "../fields/poisson.js";
import { makeBackground, type Background } from "../physics/cosmology/background.js";
import { CodeUnits } from "../physics/units.js";
import { KG_PER_EV, MPC_M, M_SUN_KG, PC_M } from "../physics/constants.js";
import { contactEnergy, kineticEnergy, periodicPotentialEnergy, potentialEnergy } from "../diagnostics/energies.js";
import { SplitStepper } from "../integrators/split-step.js";
import type { Snapshot, SnapshotMeta } from "../io/snapshot.js";
import type { FieldTransforms } from "../fields/field-transforms.js";

/** A snapshot's field in code units with the machinery to evaluate it. */
export interface LoadedField {
  readonly units: CodeUnits;
  readonly grid: Grid;
  readonly background: Background;
  readonly gravity: PoissonSolver;
  /** ψ in code units. */
  readonly psi: Float64Array;
  readonly scaleFactor: number;
  /** The contact coefficient g in code units, from the file's scattering_length or, in older files, the run's config (0 without a contact interaction). */
  readonly contact: number;
}

const KPC_M = 1e3 * PC_M;

/** The code units of a snapshot (the first box side is the code length). */
function snapshotUnits(m: SnapshotMeta): CodeUnits {
  return new CodeUnits(m.particleMassEv * KG_PER_EV, (m.boxSizeKpc[0] as number) * KPC_M);
}

/** The grid of a snapshot in code units, from its metadata alone. */
export function snapshotGrid(m: SnapshotMeta): Grid {
  const units = snapshotUnits(m);
  return new Grid(m.cells, m.boxSizeKpc.map((l) => (l * KPC_M) / units.lengthM));
}

/** Rebuild the field of a snapshot in code units; with `takeOver`, ψ is converted in snap.psi itself (which then holds code units). */
export function loadField(snap: Snapshot, takeOver = false): LoadedField {
  const m = snap.meta;
  const units = snapshotUnits(m);
  const grid = snapshotGrid(m);
  const background =
    m.background.kind === "lcdm"
      ? makeBackground({
          kind: "lcdm",
          hubble0: ((m.background.hubbleKmSMpc * 1e3) / MPC_M) * units.timeS,
          omegaMatter: m.background.omegaMatter,
          omegaRadiation: m.background.omegaRadiation,
          littleH: m.background.hubbleKmSMpc / 100,
        })
      : makeBackground({ kind: "static" });
  const gravityKind = (["periodic", "isolated", "none"].includes(m.gravity) ? m.gravity : "periodic") as GravityKind;
  const gravity = makePoissonSolver(grid, gravityKind);
  const densityUnit = (M_SUN_KG / KPC_M ** 3) / (units.massKg / units.lengthM ** 3); // Msun/kpc³ in code units
  const f = Math.sqrt(densityUnit);
  const psi = takeOver ? snap.psi : new Float64Array(snap.psi.length);
  for (let i = 0; i < psi.length; i++) psi[i] = snap.psi[i]! * f;
  // the file's own attribute; files written before it was recorded have the interaction in their config text only
  const scatteringLengthM = m.scatteringLengthM ?? contactOfConfigText(m.config, units.particleMassKg)?.scatteringLengthM ?? 0;
  const contact = scatteringLengthM !== 0 ? contactCode(scatteringLengthM, units) : 0;
  return { units, grid, background, gravity, psi, scaleFactor: m.scaleFactor, contact };
}

/** Field statistics of a snapshot in physical units. */
export interface FieldStats {
  readonly massMsun: number;
  readonly minDensityMsunKpc3: number;
  readonly maxDensityMsunKpc3: number;
  readonly meanDensityMsunKpc3: number;
  readonly kineticMsunKm2S2: number;
  readonly potentialMsunKm2S2: number;
  /** The contact interaction energy U = (g/2m²)∫ρ² dV with ρ the physical density (0 without one). */
  readonly contactMsunKm2S2: number;
  /** K + W + U. */
  readonly totalMsunKm2S2: number;
  readonly virialRatio: number;
}

/**
 * Mass, density range and energies of a loaded field (the run's own
 * diagnostics). With `fft`, K is measured on its work grid 0, and so is W for
 * periodic gravity (by Parseval, Σ ρφ = −(1/N) Σ_{k≠0} |ρ_k|²/k²: the
 * periodic solver's φ); otherwise a stepper computes φ as a run does. `known`
 * gives K and the periodic W measured already (from the spectra of ψ and of
 * the density contrast: `psibox analyze` has both).
 */
export function fieldStats(field: LoadedField, fft?: FieldTransforms, known?: { kinetic: number; periodicPotential: number }): FieldStats {
  const { grid, units, psi, scaleFactor: a } = field;
  let K: number;
  let W: number;
  if (known && field.gravity.kind !== "isolated") {
    K = known.kinetic;
    W = field.gravity.kind === "periodic" ? known.periodicPotential : 0;
  } else if (fft && field.gravity.kind !== "isolated") {
    K = kineticEnergy(grid, psi, a, fft, fft.work(0));
    W = field.gravity.kind === "periodic" ? periodicPotentialEnergy(grid, psi, a, fft) : 0;
  } else {
    const stepper = new SplitStepper(grid, field.background, field.gravity);
    stepper.setState(psi, 0);
    K = kineticEnergy(grid, stepper.psi, a, stepper.fft, new Float64Array(psi.length));
    W = potentialEnergy(grid, stepper.psi, stepper.phi, a);
  }
  // one pass: the density's range, Σρ (the mass, as fieldMass adds it) and Σρ² (the contact energy)
  let [min, max, sum, rho2] = [Infinity, 0, 0, 0];
  for (let i = 0; i < psi.length; i += 2) {
    const rho = psi[i]! ** 2 + psi[i + 1]! ** 2;
    min = Math.min(min, rho);
    if (rho > max) max = rho;
    sum += rho;
    rho2 += rho * rho;
  }
  const U = contactEnergy(grid, field.contact, rho2, a);
  const toDensity = (units.massKg / units.lengthM ** 3) / (M_SUN_KG / KPC_M ** 3);
  const toEnergy = units.energyJ / (M_SUN_KG * 1e6);
  const mass = sum * grid.cellVolume;
  return {
    massMsun: (mass * units.massKg) / M_SUN_KG,
    minDensityMsunKpc3: min * toDensity,
    maxDensityMsunKpc3: max * toDensity,
    meanDensityMsunKpc3: (mass / grid.volume) * toDensity,
    kineticMsunKm2S2: K * toEnergy,
    potentialMsunKm2S2: W * toEnergy,
    contactMsunKm2S2: U * toEnergy,
    totalMsunKm2S2: (K + W + U) * toEnergy,
    virialRatio: W !== 0 ? (2 * K) / Math.abs(W) : Number.NaN,
  };
}
