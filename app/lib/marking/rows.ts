// One row numbering everywhere: the file's own rows. The engine names readings by their index in
// the request (0-based, after any left out); everything a person reads names the row of the
// uploaded file instead, so a flag, the feedback, the readings table, a plot's tooltip and the
// "leave out" form agree, and a row keeps its number when another reading is left out.
import type { Flag } from "../kinetics/index.ts";

export type FileRowFlag = Flag & { fileRows: number[] };

/** File row of engine point i; `rowNumbers` are the file rows of the points the engine saw. */
export function fileRowOf(i: number, rowNumbers: readonly number[]): number {
  return rowNumbers[i] ?? i + 1;
}

/**
 * The flags with `fileRows` added and an engine message that names a reading by its index
 * ("Row 6 lies far ...") rewritten to name its file row. Idempotent: a flag that already has
 * `fileRows` is left as it is.
 */
export function withFileRows<F extends { code: string; message: string; rows: number[]; fileRows?: number[] }>(flags: readonly F[], rowNumbers: readonly number[]): Array<F & { fileRows: number[] }> {
  return flags.map((f) => {
    if (Array.isArray(f.fileRows)) return f as F & { fileRows: number[] };
    const fileRows = (f.rows ?? []).map((i) => fileRowOf(i, rowNumbers));
    let message = f.message;
    if (f.rows?.length === 1) message = message.replace(/^Row \d+ /, `Row ${fileRows[0]} of the file `);
    return { ...f, message, fileRows };
  });
}

/** "row 8" / "rows 3, 4, 9" (first eight, then an ellipsis). */
export function fileRowsText(fileRows: readonly number[]): string {
  if (!fileRows.length) return "";
  const shown = fileRows.slice(0, 8).join(", ");
  return `${fileRows.length === 1 ? "row" : "rows"} ${shown}${fileRows.length > 8 ? ", …" : ""}`;
}
