/**
 * An append-only CSV table written in blocks of rows. Rows are appended as
 * the run goes; a killed run loses at most the rows not yet flushed, never
 * the header or earlier blocks.
 */
import fs from "node:fs";
import { writeFileAtomic } from "./atomic.js";

/** Writes rows of numbers (or text) under a fixed header. */
export class CsvWriter {
  private readonly fd: number;
  private pending: string[] = [];
  readonly columns: readonly string[];

  /** Start a new table (`append` false) or continue an existing one after its last row. */
  constructor(file: string, columns: readonly string[], append = false) {
    this.columns = columns;
    this.fd = fs.openSync(file, append ? "a" : "w");
    if (!append) fs.writeSync(this.fd, columns.join(",") + "\n");
  }

  /**
   * Continue a table after keeping only the rows `keep` accepts (the table is
   * rewritten atomically first). The header must match `columns`.
   */
  static resume(file: string, columns: readonly string[], keep: (cells: readonly string[]) => boolean): CsvWriter {
    const lines = fs.existsSync(file) ? fs.readFileSync(file, "utf8").split("\n").filter((l) => l !== "") : [];
    if (lines[0] !== columns.join(",")) {
      writeFileAtomic(file, columns.join(",") + "\n");
    } else {
      const kept = lines.slice(1).filter((l) => keep(l.split(",")));
      writeFileAtomic(file, [lines[0], ...kept].join("\n") + "\n");
    }
    return new CsvWriter(file, columns, true);
  }

  /** Queue one row; values are written with full double precision. */
  row(values: readonly (number | string)[]): void {
    if (values.length !== this.columns.length) {
      throw new RangeError(`row has ${values.length} values for ${this.columns.length} columns`);
    }
    this.pending.push(values.map((v) => (typeof v === "number" ? formatNumber(v) : v)).join(","));
    if (this.pending.length >= 256) this.flush();
  }

  flush(): void {
    if (this.pending.length === 0) return;
    fs.writeSync(this.fd, this.pending.join("\n") + "\n");
    this.pending = [];
  }

  close(): void {
    this.flush();
    fs.fsyncSync(this.fd);
    fs.closeSync(this.fd);
  }
}

function formatNumber(v: number): string {
  if (Number.isInteger(v) && Math.abs(v) < 1e15) return String(v);
  return v.toPrecision(12);
}
