/** One CSV value: integers as they are, other numbers to 8 significant digits, strings as they are. */
export function csvValue(v: number | string): string {
  return typeof v === "number" ? (Number.isInteger(v) ? String(v) : v.toPrecision(8)) : v;
}

/** CSV text of a header and lines already joined (values as csvValue writes them). */
export function csvText(header: string[], lines: string[]): string {
  return [header.join(","), ...lines].join("\n") + "\n";
}

/** CSV text of a header and rows (values as csvValue writes them). */
export function csvTable(header: string[], rows: (number | string)[][]): string {
  return csvText(header, rows.map((r) => r.map(csvValue).join(",")));
}
