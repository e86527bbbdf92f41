// CSV text (as people's spreadsheets and loggers write it) into a table of cells, through papaparse.
// Handles comma, semicolon or tab between columns, a decimal comma, a byte-order mark, Windows
// line ends, blank lines and extra columns. Binary files are recognised and refused first.
import Papa from "papaparse";
import type { RawTable } from "./table.ts";
import { splitDecimalMessage, splitDecimalRow } from "./decimal-comma.ts";
import { convertTimeColumns } from "./clock-times.ts";
import { checkCsvBounds, CsvBoundsError, READINGS_CSV_LIMITS } from "./csv-bounds.ts";

export class Refusal extends Error {
  constructor(message: string) {
    super(message);
    this.name = "Refusal";
  }
}

/** Magic numbers of files people most often rename by mistake (from the formats' specifications, from memory). */
const SIGNATURES: Array<{ bytes: number[]; what: string }> = [
  { bytes: [0x89, 0x50, 0x4e, 0x47], what: "a PNG image" },
  { bytes: [0x25, 0x50, 0x44, 0x46], what: "a PDF document" },
  { bytes: [0xff, 0xd8, 0xff], what: "a JPEG image" },
  { bytes: [0x47, 0x49, 0x46, 0x38], what: "a GIF image" },
  { bytes: [0xd0, 0xcf, 0x11, 0xe0], what: "an old-style Office file (.xls or .doc)" },
  { bytes: [0x1f, 0x8b], what: "a gzip archive" },
];

export const ZIP_SIGNATURE = [0x50, 0x4b, 0x03, 0x04];

export function startsWith(bytes: Uint8Array, sig: number[]): boolean {
  return bytes.length >= sig.length && sig.every((b, i) => bytes[i] === b);
}

/** What kind of binary file this is, or null when it looks like text. */
export function binaryKind(bytes: Uint8Array): string | null {
  for (const s of SIGNATURES) if (startsWith(bytes, s.bytes)) return s.what;
  const head = bytes.subarray(0, 4096);
  let control = 0;
  for (const b of head) {
    if (b === 0) return "a binary file";
    if (b < 9 || (b > 13 && b < 32)) control++;
  }
  return control > head.length * 0.05 ? "a binary file" : null;
}

/** UTF-8 (with or without a byte-order mark), falling back to Windows-1252 for old exports. */
export function decodeText(bytes: Uint8Array): string {
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    text = new TextDecoder("windows-1252").decode(bytes);
  }
  return text.replace(/^\uFEFF/, "");
}

/**
 * The delimiter: the candidate found in most non-blank lines (tab first, then semicolon, then
 * comma, on a tie). Papaparse's own guess wants nearly every line to split the same way, which a
 * title line above the header defeats.
 */
export function pickDelimiter(lines: string[]): "," | ";" | "\t" {
  const counts = { "\t": 0, ";": 0, ",": 0 } as Record<"," | ";" | "\t", number>;
  for (const l of lines) for (const d of ["\t", ";", ","] as const) if (l.includes(d)) counts[d]++;
  // a tie goes to tab, then semicolon: a semicolon file with a decimal comma has as many commas
  let best: "," | ";" | "\t" = "\t";
  for (const d of [";", ","] as const) if (counts[d] > counts[best]) best = d;
  if (counts[best] === 0) return ",";
  return best;
}

/** A decimal comma is in use when numbers written "1,5" appear and the comma does not separate columns. */
function usesDecimalComma(rows: string[][], delimiter: string): boolean {
  if (delimiter === ",") return false;
  let comma = 0;
  let point = 0;
  for (const r of rows) {
    for (const c of r) {
      const s = c.trim();
      if (/^[+-]?\d*,\d+([eE][+-]?\d+)?$/.test(s)) comma++;
      else if (/^[+-]?\d*\.\d+([eE][+-]?\d+)?$/.test(s)) point++;
    }
  }
  return comma > 0 && comma >= point;
}

const DELIMITER_NAME = { ",": "commas", ";": "semicolons", "\t": "tabs" } as const;

export interface ReadOptions {
  /** the clock time of mixing, seconds after midnight, when the group gave one */
  start?: number | null;
}

export function readCsv(bytes: Uint8Array, fileName = "the file", options: ReadOptions = {}): RawTable {
  if (bytes.length === 0) throw new Refusal(`${fileName} is empty (0 bytes). Export the readings again and upload the new file.`);
  const binary = binaryKind(bytes);
  if (binary) {
    throw new Refusal(
      `${fileName} is ${binary}, not a CSV text file or an .xlsx spreadsheet. Save the readings from your spreadsheet as CSV or .xlsx and upload that.`,
    );
  }
  const text = decodeText(bytes);
  if (text.trim() === "") throw new Refusal(`${fileName} holds only blank lines. Export the readings again and upload the new file.`);
  const lines = text.split(/\r\n|\r|\n/).filter((l) => l.trim() !== "");
  const delimiter = pickDelimiter(lines);
  try {
    checkCsvBounds(text, delimiter, fileName, READINGS_CSV_LIMITS);
  } catch (error) {
    if (error instanceof CsvBoundsError) throw new Refusal(error.message);
    throw error;
  }
  const parsed = Papa.parse<string[]>(text, { delimiter, skipEmptyLines: false, newline: undefined });
  // Papa gives one record per line (quoted line breaks aside); line numbers follow records.
  const rows: RawTable["rows"] = parsed.data.map((cells, i) => ({ rowNumber: i + 1, cells: cells.map((c) => (c.trim() === "" ? null : c)) }));
  if (delimiter === ",") {
    const split = splitDecimals(parsed.data);
    if (split) throw new Refusal(`${fileName}: ${splitDecimalMessage(split, "row")}`);
  }
  const decimalComma = usesDecimalComma(parsed.data, delimiter);
  const notes = [`Columns separated by ${DELIMITER_NAME[delimiter]}${decimalComma ? ", decimal comma" : ""}.`];
  // "03:00", "1:03:00", "14:05:00": seconds elapsed, and a note saying how they were read
  const times = convertTimeColumns(rows, options.start ?? null);
  notes.push(...times.notes);
  return { source: "csv", rows, notes, decimalComma, elapsedColumns: times.columns };
}

/**
 * Numbers split at a decimal comma in a comma-separated file: the header is the last text row
 * above the first row of whole numbers, the data rows those below it made only of numbers.
 */
function splitDecimals(records: string[][]): { line: number; cells: string[] } | null {
  const rows = records.map((cells, i) => ({ line: i + 1, cells })).filter((r) => r.cells.some((c) => c.trim() !== ""));
  const isNumber = (c: string) => /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(c.trim());
  const numeric = (r: { cells: string[] }) => r.cells.filter((c) => c.trim() !== "").every(isNumber);
  const first = rows.findIndex(numeric);
  if (first < 0) return null;
  const header = first > 0 ? rows[first - 1].cells : null;
  return splitDecimalRow(header, rows.slice(first).filter(numeric));
}
