/**
 * An ensemble's folder: what identifies the ensemble (so members of another
 * config, N, seed or sample times are never mixed in), the classical
 * reference and one file per completed member, each written atomically, so
 * a killed ensemble keeps every member it finished and a later call only
 * adds the missing ones. A member file holds its field at every sample
 * time, code units, float64 little-endian, [time][cell][re, im].
 */
import fs from "node:fs";
import path from "node:path";
import { InputError } from "../core/errors.js";
import { fileName } from "../core/sanitize.js";
import { cleanStaleTemporaries, writeFileAtomic } from "../io/atomic.js";
import { deleteOwned, recordOwned } from "../simulation/run-manifest.js";

/** What makes two ensembles the same: members of one can join the other. */
export interface EnsembleIdentity {
  /** SHA-256 of the resolved run config without its [ensemble] section. */
  readonly config_sha256: string;
  readonly cells: number;
  readonly particles: number;
  readonly seed: number;
  /** Sample times in code units. */
  readonly times_code: readonly number[];
}

/** The files psibox writes in an ensemble folder. */
export const ENSEMBLE_FILES = ["ensemble.json", "config.toml", "reference.f64", "members/", "slurm/", "series.csv", "fields.h5", "summary.json", "report.html"] as const;

const IDENTITY = "ensemble.json";

/** The folder of one ensemble. */
export class EnsembleStore {
  readonly dir: string;
  readonly identity: EnsembleIdentity;

  private constructor(dir: string, identity: EnsembleIdentity) {
    this.dir = dir;
    this.identity = identity;
  }

  /**
   * Open `dir` for `identity`: an empty or new folder is set up; a folder of
   * the same ensemble is continued; one of another ensemble is refused
   * unless `force`, which deletes what psibox wrote there first.
   */
  static open(dir: string, identity: EnsembleIdentity, configText: string, force: boolean): { store: EnsembleStore; kept: number } {
    fs.mkdirSync(dir, { recursive: true });
    const file = path.join(dir, IDENTITY);
    if (fs.existsSync(file) && force) {
      deleteOwned(dir);
    } else if (fs.existsSync(file)) {
      checkSame(dir, readIdentity(file), identity, "pass --force to replace it, or set output.dir");
    }
    recordOwned(dir, [...ENSEMBLE_FILES]);
    fs.mkdirSync(path.join(dir, "members"), { recursive: true });
    cleanStaleTemporaries(dir);
    cleanStaleTemporaries(path.join(dir, "members"));
    if (!fs.existsSync(file)) writeFileAtomic(file, JSON.stringify(identity, null, 2) + "\n");
    writeFileAtomic(path.join(dir, "config.toml"), configText);
    const store = new EnsembleStore(dir, identity);
    return { store, kept: store.completed().length };
  }

  /**
   * Join the ensemble set up in `dir` (by open) as one of several processes
   * adding members to it at once (a Slurm array task): the identity must be
   * the same, and nothing but member files is ever written, so the tasks
   * never race on the folder's identity, config or manifest.
   */
  static join(dir: string, identity: EnsembleIdentity): EnsembleStore {
    const file = path.join(dir, IDENTITY);
    if (!fs.existsSync(file)) throw new InputError(`${fileName(dir)}: no ensemble is set up there (no ${IDENTITY}); psibox ensemble CONFIG --emit slurm sets it up before the array`);
    checkSame(dir, readIdentity(file), identity, "emit the array again (psibox ensemble CONFIG --emit slurm --force)");
    return new EnsembleStore(dir, identity);
  }

  /** Open an existing ensemble folder for reading. */
  static read(dir: string): EnsembleStore {
    const file = path.join(dir, IDENTITY);
    if (!fs.existsSync(file)) throw new InputError(`${fileName(dir)}: not an ensemble folder (no ${IDENTITY})`);
    return new EnsembleStore(dir, readIdentity(file));
  }

  memberPath(index: number): string {
    return path.join(this.dir, "members", `m${String(index).padStart(6, "0")}.f64`);
  }

  get referencePath(): string {
    return path.join(this.dir, "reference.f64");
  }

  /** Is the classical reference written? */
  hasReference(): boolean {
    return fs.existsSync(this.referencePath) && fs.statSync(this.referencePath).size === this.fileBytes();
  }

  /** Indices of the completed members, increasing. */
  completed(): number[] {
    const bytes = this.fileBytes();
    return fs
      .readdirSync(path.join(this.dir, "members"))
      .map((n) => /^m(\d{6})\.f64$/.exec(n))
      .filter((m): m is RegExpExecArray => m !== null && fs.statSync(path.join(this.dir, "members", m[0])).size === bytes)
      .map((m) => Number(m[1]))
      .sort((a, b) => a - b);
  }

  /** Bytes of one member's file. */
  fileBytes(): number {
    return this.identity.times_code.length * this.identity.cells * 16;
  }

  /** Write a member's (or, index undefined, the reference's) samples, [time][cell][re, im], atomically. */
  write(index: number | undefined, all: Float64Array): void {
    if (all.length !== this.identity.times_code.length * this.identity.cells * 2) throw new RangeError(`a member holds ${this.identity.times_code.length} × ${this.identity.cells} complex values, got ${all.length / 2}`);
    writeFileAtomic(index === undefined ? this.referencePath : this.memberPath(index), new Uint8Array(all.buffer, all.byteOffset, all.byteLength));
  }

  /** One sample time's field of a member (or of the reference), code units. */
  readSample(index: number | undefined, sample: number): Float64Array {
    const n = this.identity.cells * 2;
    const out = new Float64Array(n);
    const fd = fs.openSync(index === undefined ? this.referencePath : this.memberPath(index), "r");
    try {
      fs.readSync(fd, new Uint8Array(out.buffer), 0, n * 8, sample * n * 8);
    } finally {
      fs.closeSync(fd);
    }
    return out;
  }
}

/** Refuse an ensemble folder whose identity is not `identity`, naming the first difference. */
function checkSame(dir: string, before: EnsembleIdentity, identity: EnsembleIdentity, remedy: string): void {
  const differs = (Object.keys(identity) as (keyof EnsembleIdentity)[]).find((k) => JSON.stringify(before[k]) !== JSON.stringify(identity[k]));
  if (differs) throw new InputError(`${fileName(dir)}: holds an ensemble with another ${differs.replace(/_/g, " ")}; ${remedy}`);
}

function readIdentity(file: string): EnsembleIdentity {
  try {
    return JSON.parse(fs.readFileSync(file, "utf8")) as EnsembleIdentity;
  } catch (e) {
    throw new InputError(`${fileName(file)}: not readable (${(e as Error).message.split("\n")[0]}); remove the folder or pass --force`);
  }
}
