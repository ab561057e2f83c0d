/**
 * CSV for the charts' "CSV" buttons (pure): RFC 4180 (comma, CRLF, fields with a comma, quote or
 * line break quoted, quotes doubled). Numbers are written with JavaScript's shortest round-trip
 * form (String(n)), never re-rounded, so each value parses back to exactly the number of the
 * chart data; null or undefined is an empty field (a gap).
 */
export type CsvValue = number | string | boolean | null | undefined;

function field(value: CsvValue): string {
  if (value === null || value === undefined) return "";
  const text =
    typeof value === "number" ? (Number.isFinite(value) ? String(value) : "") : String(value);
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

export function buildCsv(
  header: readonly string[],
  rows: readonly (readonly CsvValue[])[],
): string {
  const lines = [header.map(field).join(",")];
  for (const row of rows) {
    if (row.length !== header.length)
      throw new Error(`CSV row has ${row.length} fields, the header ${header.length}`);
    lines.push(row.map(field).join(","));
  }
  return lines.join("\r\n") + "\r\n";
}

/** Rows from equally long columns (column-major chart data). */
export function columnsToRows(columns: readonly (readonly CsvValue[])[]): CsvValue[][] {
  const n = columns[0]?.length ?? 0;
  for (const c of columns)
    if (c.length !== n) throw new Error(`CSV columns differ in length (${c.length} and ${n})`);
  return Array.from({ length: n }, (_, i) => columns.map((c) => c[i]));
}

/** A file name from a chart title: lower case, ASCII letters and digits, hyphens. */
export function fileSlug(title: string): string {
  return title
    .normalize("NFKD")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-|-$/g, "");
}
