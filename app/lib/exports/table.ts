// One description of an export table, used for both the .xlsx sheet and the CSV, so the two
// always agree: each column's header, unit, kind and how to read its value from a row.
export type CellKind = "text" | "number" | "integer" | "boolean" | "datetime";
export type CellValue = string | number | boolean | Date | null;

export interface SheetColumn<Row> {
  header: string;
  /** written after the header in brackets, e.g. "mol/L" -> "CA0 (mol/L)" */
  unit?: string;
  kind: CellKind;
  value: (row: Row) => CellValue;
  /** characters; a sensible width per kind when left out */
  width?: number;
  /** Excel number format for number columns, e.g. "0.00" or "0.000E+00" */
  numFmt?: string;
}

export function headerText(c: { header: string; unit?: string }) {
  return c.unit ? `${c.header} (${c.unit})` : c.header;
}

/** A cell's value in its column's kind: numbers that cannot be computed are left empty, never NaN or text. */
export function typedValue(kind: CellKind, raw: CellValue | undefined): CellValue {
  if (raw === null || raw === undefined) return null;
  switch (kind) {
    case "number":
    case "integer":
      return typeof raw === "number" && Number.isFinite(raw) ? raw : null;
    case "boolean":
      return typeof raw === "boolean" ? raw : null;
    case "datetime":
      return raw instanceof Date && !Number.isNaN(raw.getTime()) ? raw : null;
    default:
      return String(raw);
  }
}

/** "2026-12-02 09:30" in UTC: the same text whatever the server's time zone. */
export function isoMinute(d: Date) {
  return d.toISOString().slice(0, 16).replace("T", " ");
}

/**
 * A number in plain decimal form with a dot, never an exponent: 1.5e-7 -> "0.00000015",
 * 2e21 -> "2000000000000000000000". The digits are JavaScript's shortest round-trip digits, moved.
 */
export function plainNumber(n: number): string {
  const text = String(n);
  const m = /^(-?)(\d)(?:\.(\d+))?e([+-]\d+)$/.exec(text);
  if (!m) return text;
  const [, sign, lead, rest = "", exp] = m;
  const digits = lead + rest;
  const point = 1 + Number(exp); // where the decimal point goes within `digits`
  if (point <= 0) return `${sign}0.${"0".repeat(-point)}${digits}`;
  if (point >= digits.length) return sign + digits + "0".repeat(point - digits.length);
  return `${sign}${digits.slice(0, point)}.${digits.slice(point)}`;
}

function csvField(kind: CellKind, raw: CellValue | undefined): string {
  const v = typedValue(kind, raw);
  if (v === null) return "";
  let text: string;
  if (typeof v === "number") text = plainNumber(v);
  else if (typeof v === "boolean") text = v ? "TRUE" : "FALSE";
  else if (v instanceof Date) text = isoMinute(v);
  // A text cell a spreadsheet would run as a formula gets a leading apostrophe (OWASP advice on CSV injection).
  else text = /^[=+\-@\t\r]/.test(v) ? `'${v}` : v;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * CSV as spreadsheets read it: UTF-8 with a byte-order mark (so accents survive), comma
 * separated, CRLF line ends (RFC 4180), plain numbers with a dot for decimals (no exponent), headers
 * with their units.
 */
export function toCsv<Row>(columns: SheetColumn<Row>[], rows: readonly Row[], emptyNote?: string): string {
  const lines = [columns.map((c) => csvField("text", headerText(c))).join(",")];
  for (const row of rows) lines.push(columns.map((c) => csvField(c.kind, c.value(row))).join(","));
  if (!rows.length && emptyNote) lines.push(csvField("text", emptyNote));
  return "\uFEFF" + lines.join("\r\n") + "\r\n";
}
