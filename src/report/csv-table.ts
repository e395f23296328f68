import { PRECISION8_ROOM, precision8, writePrecision8 } from "./csv-number.js";

/** One CSV value: integers as they are, other numbers to 8 significant digits (as toPrecision(8)), strings as they are. */
export function csvValue(v: number | string): string {
  return typeof v === "number" ? (Number.isInteger(v) ? String(v) : precision8(v)) : v;
}

/** CSV text of a header and rows (values as csvValue writes them). */
export function csvTable(header: string[], rows: (number | string)[][]): string {
  return [header.join(","), ...rows.map((r) => r.map(csvValue).join(","))].join("\n") + "\n";
}

/**
 * A CSV table written straight into bytes, row by row, as csvTable writes its text (the same bytes; values
 * and header are ASCII): one growing buffer instead of a string per value and per line, for tables of many
 * thousand rows built on a thread whose young generation is small.
 */
export class CsvBytes {
  private bytes = new Uint8Array(1 << 16);
  private length = 0;
  /** Rows written (the header apart). */
  rows = 0;
  private first = true;

  constructor(header: readonly string[]) {
    this.text(header.join(","));
  }

  private room(n: number): void {
    if (this.length + n <= this.bytes.length) return;
    const grown = new Uint8Array(Math.max(2 * this.bytes.length, this.length + n));
    grown.set(this.bytes.subarray(0, this.length));
    this.bytes = grown;
  }

  private text(s: string): void {
    this.room(s.length);
    for (let i = 0; i < s.length; i++) this.bytes[this.length++] = s.charCodeAt(i);
  }

  /** The next value of the current row (a new row after `endRow`). */
  value(v: number): void {
    this.room(2);
    this.bytes[this.length++] = this.first ? 10 : 44; // "\n" ends the line before, "," separates
    this.first = false;
    if (Number.isInteger(v)) {
      if (v > -10 && v < 10) {
        if (v < 0) this.bytes[this.length++] = 45; // "-"
        this.bytes[this.length++] = 48 + Math.abs(v); // String(v) of a one-digit integer (−0 too: "0")
      } else this.text(String(v));
      return;
    }
    this.room(PRECISION8_ROOM);
    const end = writePrecision8(this.bytes, this.length, v);
    if (end >= 0) this.length = end;
    else this.text(v.toPrecision(8));
  }

  endRow(): void {
    this.first = true;
    this.rows++;
  }

  /** The table's bytes, ending in a newline (a view of the buffer: written no more after this). */
  finish(): Uint8Array {
    this.room(1);
    this.bytes[this.length++] = 10;
    return this.bytes.subarray(0, this.length);
  }
}
