// Readings for a fixture bench made from an independent ground truth: the rate equations
// dCA/dt = -k CA CB, dCB/dt = -nu k CA CB integrated by odex (scripts/audit/simulate.ts odeTruth,
// Gragg-Bulirsch-Stoer at relative tolerance 1e-12), never from the engine's closed forms. The
// files are then written as spreadsheets and loggers write them (units row, clock times, ...).
import ExcelJS from "exceljs";
import { odeTruth } from "../../scripts/audit/simulate";
import type { Bench } from "~/.server/db/lab-sessions.server";
import type { Practical } from "./practical-fixture";

export interface Truth {
  /** seconds after mixing */
  t: number[];
  /** mol/L */
  CA: number[];
  k: number;
}

/** A + B at the bench's feed and the reference k at its temperature (fixture: nu = 1). */
export function benchTruth(p: Practical, bench: Bench, times: number[]): Truth {
  const k = p.kAt(bench);
  const { CA } = odeTruth("second-order-AB", { CA0: bench.CA0, CB0: bench.CB0, nu: 1 }, k, times);
  return { t: times, CA, k };
}

/** Every `step` seconds from 0 to `end`. */
export const everyS = (step: number, end: number) => Array.from({ length: Math.floor(end / step) + 1 }, (_, i) => i * step);

/** Four significant figures, as a logger or a spreadsheet's default number format writes. */
export const sig4 = (x: number) => Number(x.toPrecision(4)).toString();

/** mm:ss or h:mm:ss as a stopwatch or a logger writes elapsed time. */
export function stopwatch(seconds: number, form: "mm:ss" | "h:mm:ss"): string {
  const s = Math.round(seconds);
  const two = (n: number) => String(n).padStart(2, "0");
  if (form === "mm:ss") return `${two(Math.floor(s / 60))}:${two(s % 60)}`;
  return `${Math.floor(s / 3600)}:${two(Math.floor((s % 3600) / 60))}:${two(s % 60)}`;
}

/** hh:mm:ss on a wall clock, `startS` seconds after midnight plus `seconds`. */
export function clock(startS: number, seconds: number): string {
  const s = Math.round(startS + seconds) % 86400;
  const two = (n: number) => String(n).padStart(2, "0");
  return `${two(Math.floor(s / 3600))}:${two(Math.floor((s % 3600) / 60))}:${two(s % 60)}`;
}

/** An .xlsx workbook with one sheet of the given rows (as a spreadsheet saves it). */
export async function workbook(rows: Array<Array<string | number | Date | ExcelJS.CellFormulaValue | null>>, sheet = "Readings"): Promise<Uint8Array> {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet(sheet);
  for (const r of rows) ws.addRow(r);
  return new Uint8Array(await wb.xlsx.writeBuffer());
}
