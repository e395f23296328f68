/** CSV text of a header and rows: integers as they are, other numbers to 8 significant digits. */
export function csvTable(header: string[], rows: (number | string)[][]): string {
  return [header.join(","), ...rows.map((r) => r.map((v) => (typeof v === "number" ? (Number.isInteger(v) ? String(v) : v.toPrecision(8)) : v)).join(","))].join("\n") + "\n";
}
