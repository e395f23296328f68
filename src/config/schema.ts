/**
 * The config file's schema (TOML, validated with zod). Every dimensional
 * value is a string of a number and a unit, read by physics/units.ts in
 * config/resolve.ts. Unknown keys are errors. Defaults are listed here and
 * in the README's config reference.
 */
import { z } from "zod";

const quantity = z.string();
const quantityList = z.union([quantity, z.array(quantity).min(1).max(3)], {
  error: 'expected a value with a unit such as "10 kpc", or a list of 1–3 of them',
});

export const gridSchema = z.strictObject({
  /** Cells per simulated axis: one number (1D) or a list of 1–3 powers of two. */
  cells: z.union([z.number().int(), z.array(z.number().int()).min(1).max(3)], {
    error: "expected a whole number or a list of 1–3 whole numbers, e.g. [64, 64]",
  }),
  /** Side length: one length for every axis, or one per axis. */
  box: quantityList,
  /** Gravity boundary conditions. @default "periodic" */
  gravity: z.enum(["periodic", "isolated", "none"]).default("periodic"),
  /** Laplacian symbol of the periodic Poisson solve. @default "spectral" */
  poisson: z.enum(["spectral", "finite-difference"]).default("spectral"),
});

/** The keys of a table that may carry a contact interaction (the particle's, a species'); read by config/resolve-contact.ts. */
export const contactKeys = {
  /** s-wave scattering length a_s, e.g. "1e-80 m" (negative: attractive). @default none */
  scattering_length: quantity.optional(),
  /** Decay constant f of an axion-like field, e.g. "1e17 GeV": a_s = −(ħc)(mc²)/(32π f²), attractive. @default none */
  decay_constant: quantity.optional(),
};

export const particleSchema = z.strictObject({
  /** Particle mass, e.g. "1e-22 eV". */
  mass: quantity,
  ...contactKeys,
  /** Runs with [[species]]: the name of this first species (the run's reference field). @default "main" */
  name: z.string().optional(),
});

export const backgroundSchema = z.discriminatedUnion("kind", [
  z.strictObject({ kind: z.literal("static") }),
  z.strictObject({
    kind: z.literal("lcdm"),
    /** H0. @default "67.36 km/s/Mpc" (Planck 2018) */
    hubble: quantity.default("67.36 km/s/Mpc"),
    /** Ω_m today. @default 0.3153 (Planck 2018) */
    omega_matter: z.number().default(0.3153),
    /** Ω_r today. @default 0 */
    omega_radiation: z.number().default(0),
  }),
]);

export const spanSchema = z.strictObject({
  /** Static runs: how long to run, e.g. "2 Gyr". */
  duration: quantity.optional(),
  /** Expanding runs: start redshift. */
  start_redshift: z.number().optional(),
  /** Expanding runs: end redshift. @default 0 */
  end_redshift: z.number().optional(),
});

export const planeWaveSchema = z.strictObject({
  kind: z.literal("plane-wave"),
  /** Mean density ρ̄; static runs must give it, expanding runs default to the cosmic mean Ω_m ρ_crit. */
  mean_density: quantity.optional(),
  /** Density contrast ε of δ = ε cos(k·x). @default 0.01 */
  contrast: z.number().default(0.01),
  /** Integer wave vector: whole wavelengths per box side, one per axis. @default [1, 0, 0] */
  mode: z.array(z.number().int()).min(1).max(3).optional(),
});

export const packetSchema = z.strictObject({
  kind: z.literal("gaussian-packet"),
  /** Mass of the packet. */
  mass: quantity,
  /** Width σ of |ψ|² ∝ exp(−r²/2σ²). */
  width: quantity,
  /** Centre, one length per axis. @default the box centre */
  center: z.array(quantity).min(1).max(3).optional(),
  /** Bulk velocity, one per axis. @default 0 */
  velocity: z.array(quantity).min(1).max(3).optional(),
});

export const groundStateSchema = z.strictObject({
  kind: z.literal("ground-state"),
  /** Mass of the soliton. */
  mass: quantity,
  /** Width σ of the Gaussian the relaxation starts from. @default a tenth of the smallest box side */
  guess_width: quantity.optional(),
  /** Centre, one length per axis. @default the box centre */
  center: z.array(quantity).min(1).max(3).optional(),
});

export const cosmologicalSchema = z.strictObject({
  kind: z.literal("cosmological"),
  /** Seed of the random field: the same seed gives the same field. @default 1 */
  seed: z.number().int().default(1),
  /** σ₈ at z = 0 (top-hat of 8 Mpc/h). @default 0.8111 (Planck 2018) */
  sigma_8: z.number().default(0.8111),
  /** Primordial spectral index n_s. @default 0.9649 (Planck 2018) */
  spectral_index: z.number().default(0.9649),
  /** Ω_b today (Eisenstein & Hu transfer function only). @default 0.0493 (Planck 2018: Ω_b h² = 0.02237) */
  omega_baryon: z.number().default(0.0493),
  /** CMB temperature, e.g. "2.7255 K". @default "2.7255 K" */
  cmb_temperature: z.string().default("2.7255 K"),
  /** CDM transfer function, or "table" for a user's table (spectrum_table). @default "eisenstein-hu" */
  transfer: z.enum(["eisenstein-hu", "bbks", "table"]).default("eisenstein-hu"),
  /** transfer = "table": a text file of k and P(k) or T(k) per line, relative to the working folder. */
  spectrum_table: z.string().min(1).optional(),
  /** What the table's second column holds: "power" (P(k) of cold matter at z = 0, used as given) or "transfer" (T(k), normalised to sigma_8). @default "power" */
  table_quantity: z.enum(["power", "transfer"]).optional(),
  /** Unit of the table's k, an inverse length. @default "h/Mpc" */
  table_k_unit: z.string().optional(),
  /** Unit of the table's P(k), a volume. @default "Mpc^3/h^3" */
  table_power_unit: z.string().optional(),
  /** Apply the wave-dark-matter suppression of Hu, Barkana & Gruzinov 2000. @default true */
  wave_suppression: z.boolean().default(true),
  /** Set every mode's amplitude to its mean ("fixed" fields). @default false */
  fixed_amplitude: z.boolean().default(false),
  /** Flip the sign of every mode (the partner of a "paired" field). @default false */
  paired: z.boolean().default(false),
});

export const noiseSchema = z.strictObject({
  kind: z.literal("white-noise"),
  /** Mean density; expanding runs default to the cosmic mean. */
  mean_density: quantity.optional(),
  /** Standard deviation of δ in each cell (white, Gaussian). */
  amplitude: z.number(),
  /** Seed. @default 1 */
  seed: z.number().int().default(1),
});

export const randomSolitonsSchema = z.strictObject({
  kind: z.literal("random-solitons"),
  /** How many solitons. */
  count: z.number().int(),
  /** Mass of each. */
  mass: quantity,
  /** Seed of positions, velocities and phases. @default 1 */
  seed: z.number().int().default(1),
  /** One-dimensional velocity dispersion of the solitons. @default at rest */
  velocity_dispersion: quantity.optional(),
});

export const solitonSchema = z.strictObject({
  /** Mass of this soliton (or give core_radius in 3D). */
  mass: quantity.optional(),
  /** 3D only: core radius (density half its peak) instead of the mass. */
  core_radius: quantity.optional(),
  /** Centre, one length per axis. */
  center: z.array(quantity).min(1).max(3),
  /** Velocity, one per axis. @default at rest */
  velocity: z.array(quantity).min(1).max(3).optional(),
  /** Phase offset [radians]. @default 0 */
  phase: z.number().default(0),
});

export const solitonsSchema = z.strictObject({
  kind: z.literal("solitons"),
  /** Profile: relaxed on the grid by imaginary time, or the published core fit (3D). @default "relaxed" */
  profile: z.enum(["relaxed", "core-fit"]).default("relaxed"),
  /** The solitons: a list of tables [[initial.soliton]]. */
  soliton: z.array(solitonSchema).min(1),
});

export const snapshotFieldSchema = z.strictObject({
  kind: z.literal("snapshot"),
  /** A psibox snapshot or checkpoint, or an imported field (psibox import), relative to the working folder. */
  file: z.string().min(1),
  /** Static runs: the time of the field, where the run starts. @default the snapshot's time */
  time: quantity.optional(),
});

export const initialSchema = z.discriminatedUnion("kind", [
  planeWaveSchema,
  packetSchema,
  groundStateSchema,
  solitonsSchema,
  randomSolitonsSchema,
  cosmologicalSchema,
  noiseSchema,
  snapshotFieldSchema,
]);

/** One more species of particle beside the first ([particle] and [initial]), sharing its gravity. */
export const speciesSchema = z.strictObject({
  /** Its name: a letter, then letters, digits or "_" (at most 32); names its outputs. */
  name: z.string(),
  /** Its particle mass, e.g. "4e-22 eV". */
  particle_mass: quantity,
  ...contactKeys,
  /** Its initial field: a table of any [initial] kind. */
  initial: initialSchema.optional(),
});

export const integratorSchema = z.strictObject({
  /** Safety factor s: kinetic phase ≤ 2πs and potential phase ≤ πs per step. @default 0.25 */
  safety: z.number().default(0.25),
  /** A fixed step instead of the phase rules, e.g. "0.1 Myr". */
  fixed_step: quantity.optional(),
  /** Run a fixed step even when its phase per step is more than 10 times the phase rules' limit (a warning instead of a refusal). @default false */
  allow_large_fixed_step: z.boolean().default(false),
  /** Largest step in ln a (expanding runs). @default 0.01 */
  max_dln_a: z.number().default(0.01),
  /** Largest relative mass drift before the run stops. @default 1e-8 */
  mass_tolerance: z.number().default(1e-8),
  /** Step cap. @default 10000000 */
  max_steps: z.number().int().default(10_000_000),
  /** Worker threads for the step (1: none). @default the number of cores (1 below 2^17 cells in 1D and 2D, below 2^18 = 64³ in 3D) */
  threads: z.number().int().optional(),
  /** FFT implementation of the step: "wasm" (WebAssembly SIMD), "js" (fft.js) or "auto" (wasm when the grid fits its 4 GiB memory). @default "auto" */
  fft: z.enum(["auto", "wasm", "js"]).default("auto"),
});

export const outputSchema = z.strictObject({
  /** Output folder. @default "output/<config file name>" */
  dir: z.string().optional(),
  /** Write a time-series row every this many steps (and always the first and last). @default 1 below 2^18 cells, else 8 */
  timeseries_every: z.number().int().optional(),
  /** Time unit of the outputs, e.g. "Myr". @default the unit of span.duration, or "Gyr" */
  time_unit: z.string().optional(),
  /** Write a snapshot every this many steps. @default off */
  snapshot_every: z.number().int().optional(),
  /** Write a snapshot at every multiple of this time after the start, e.g. "10 Myr". @default off */
  snapshot_interval: quantity.optional(),
  /** Expanding runs: write a snapshot at each of these redshifts. @default none */
  snapshot_redshifts: z.array(z.number()).optional(),
  /** Floating-point precision of ψ in snapshots. @default "float64" */
  snapshot_precision: z.enum(["float64", "float32"]).default("float64"),
  /** After the run, analyse every snapshot (tables and pictures in analysis/), as psibox analyze does. @default false */
  analyze: z.boolean().default(false),
  /** Write a checkpoint (for --resume) every this many steps. @default 1000 */
  checkpoint_every: z.number().int().default(1000),
  /** 2D/3D runs: count the vortices (2D) or measure the vortex line length (3D) at every time-series row. @default false */
  vortex_census: z.boolean().default(false),
});

export const sidecarSchema = z.strictObject({
  /** Run the quantum sidecar's clocks alongside the solver. @default true */
  enabled: z.boolean().default(true),
  /** The squeezing level the squeezing clock times, in dB (negative). @default -10 */
  squeezing_db: z.number().default(-10),
  /** The mode starts squeezed with this parameter r ≥ 0 (0: coherent). @default 0 */
  squeeze: z.number().default(0),
  /** Angle of the squeezing from the mean field's direction [rad]: 0 squeezes the number, π the phase. @default 0 */
  squeeze_angle: z.number().default(0),
  /** Mean thermal quanta in the mode's start. @default 0 */
  thermal_quanta: z.number().default(0),
  /** Rate at which the mode loses quanta, a rate with its unit, e.g. "1/Gyr". @default "0/s" */
  loss_rate: z.string().default("0/s"),
  /** Dephasing rate of the mode, e.g. "0.1/Myr". @default "0/s" */
  dephasing_rate: z.string().default("0/s"),
  /**
   * Measure the adiabatic coefficient with a twin field ψ₂(0) = (1 + e/2)ψ(0) advanced with its own gravity:
   * e, from 1e-6 to 0.1 (0: no twin). @default 0
   */
  twin_excess: z.number().default(0),
  /** Measure a region's mass outflow at every time-series row as a loss rate: "none", "sphere", "cube" or "densest". @default "none" */
  outflow_region: z.enum(["none", "sphere", "cube", "densest"]).default("none"),
  /** Centre of the outflow region (sphere, cube), one length per axis. @default the box centre */
  outflow_center: z.array(quantity).min(1).max(3).optional(),
  /** Radius of the outflow sphere (or the densest cell's sphere), or the cube's half-width, e.g. "3 kpc". */
  outflow_radius: quantity.optional(),
});

export const breakdownSchema = z.strictObject({
  /** Advance a tangent-linear companion field and measure the run's Lyapunov rate (columns lyapunov_*). @default false */
  tangent: z.boolean().default(false),
  /** Benettin renormalisation interval, a time, e.g. "50 Myr". @default one dynamical time 1/√(4πGρ_eff) at the start */
  interval: quantity.optional(),
  /** Depletion probes p (2p tangent-linear fields; 0: no depletion measured). @default 0 */
  probes: z.number().default(0),
  /** Seed of the companion's band-limited start and of the probes' noise. @default 1 */
  seed: z.number().default(1),
  /** The depletion clock rings when the measured N_dep reaches this fraction of N, in (0, 1]. @default 0.1 */
  depletion_fraction: z.number().default(0.1),
  /** Where the Lyapunov rate is measured: box, sphere, cube or densest (a sphere around the densest cell at the start). @default "box" */
  region: z.string().default("box"),
  /** The region's centre, one length per axis, e.g. ["10 kpc", "10 kpc"] (sphere, cube). */
  region_center: z.array(z.string()).optional(),
  /** The region's radius (a cube's half-width), e.g. "2 kpc" (sphere, cube, densest). */
  region_radius: z.string().optional(),
  /** Cross-check: a twin nonlinear run from ψ + e·u with the tangent's start u, e relative to ‖ψ‖, from 1e-12 to 1e-3 (0: none). @default 0 */
  twin_offset: z.number().default(0),
});

export const ensembleSchema = z.strictObject({
  /** Members M of the truncated-Wigner ensemble (psibox ensemble), at least 2. @default 64 */
  members: z.number().default(64),
  /** Particles N in the box, which sets the vacuum noise: "physical" (the field's mass over particle.mass) or a number ≥ 1 (an effective N). @default "physical" */
  particles: z.union([z.number(), z.literal("physical")], { error: 'expected "physical" or a number ≥ 1, e.g. 1e6' }).default("physical"),
  /** Seed of the members' vacuum noise, a whole number from 0 to 4294967295. @default 1 */
  noise_seed: z.number().default(1),
  /** Sample times: the span cut into this many equal intervals (the start and every cut). @default 16 */
  samples: z.number().default(16),
  /** The departure clock rings when ‖⟨ψ⟩ − ψ_classical‖ / ‖ψ_classical‖ reaches this level, in (0, 2]. @default 0.1 */
  departure: z.number().default(0.1),
  /** Bootstrap resamples for the errors, from 8 to 1000. @default 32 */
  resamples: z.number().default(32),
});

const sweepRange = z.strictObject({
  /** First value: a number, or a quantity with its unit. */
  from: z.union([z.number(), z.string()], { error: 'expected a number or a quantity such as "2 kpc"' }),
  /** Last value (same unit as `from`). */
  to: z.union([z.number(), z.string()], { error: 'expected a number or a quantity such as "2 kpc"' }),
  /** How many values, ≥ 2. */
  count: z.number().int(),
  /** Spacing. @default "linear" */
  scale: z.enum(["linear", "log"]).default("linear"),
});

export const sweepSchema = z.strictObject({
  /** How the value lists combine: every combination, or the i-th values together. @default "product" */
  combine: z.enum(["product", "zip"]).default("product"),
  /** The swept keys ("section.key") with a list of values or a range. */
  values: z.record(z.string(), z.union([z.array(z.union([z.number(), z.string(), z.boolean(), z.array(z.union([z.number(), z.string()]))])), sweepRange])),
});

export const clusterSchema = z.strictObject({
  /** Slurm partition. @default the cluster's default */
  partition: z.string().optional(),
  /** Wall-time limit per entry, Slurm format "HH:MM:SS". @default "01:00:00" */
  time: z.string().default("01:00:00"),
  /** CPU cores per entry. @default 1 */
  cpus: z.number().int().default(1),
  /** Memory per entry, Slurm format, e.g. "4G". @default "2G" */
  memory: z.string().default("2G"),
  /** Most array tasks running at once (Slurm's %N throttle). @default 8 */
  max_parallel: z.number().int().default(8),
});

export const userConfigSchema = z.strictObject({
  grid: gridSchema,
  particle: particleSchema,
  background: backgroundSchema.default({ kind: "static" }),
  span: spanSchema,
  initial: initialSchema,
  /** More species sharing the potential: a list of tables [[species]]. @default none */
  species: z.array(speciesSchema).optional(),
  integrator: integratorSchema.default(integratorSchema.parse({})),
  output: outputSchema.default(outputSchema.parse({})),
  sidecar: sidecarSchema.default(sidecarSchema.parse({})),
  breakdown: breakdownSchema.default(breakdownSchema.parse({})),
  /** A truncated-Wigner ensemble of the run (psibox ensemble); absent: its defaults. */
  ensemble: ensembleSchema.optional(),
  /** A parameter sweep (psibox sweep). */
  sweep: sweepSchema.optional(),
  /** Cluster resources for psibox sweep --emit slurm. */
  cluster: clusterSchema.optional(),
});

/** A config as written by a user (before defaults). */
export type UserConfig = z.input<typeof userConfigSchema>;
/** A config with defaults filled in (still in physical units, as text). */
export type CheckedConfig = z.output<typeof userConfigSchema>;
