// Times as loggers, stopwatches and spreadsheets write them: "03:00" (minutes:seconds on a
// stopwatch), "1:03:00" (hours:minutes:seconds since the start), "14:05:00" (a wall clock) or
// "2026-12-04 14:05:00", turned into seconds elapsed. Pure: the CSV reader and the workbook reader
// (whose time cells arrive as dates) share the rules, and each says in a note how it read them.
//
// The rules (common practice, no source):
// - a start given by the group (the clock time of mixing) makes the column clock times, counted
//   from that start; a reading before the start is refused with its row;
// - two parts (mm:ss) are a stopwatch's minutes and seconds, unless the header names a clock or
//   hh:mm, then hours and minutes of a clock;
// - three parts (h:mm:ss) or a workbook's time cell: elapsed since zero when the first reading is
//   within the first hour (a timer or logger started at mixing), else a clock, counted from the
//   first reading; a clock that passes midnight goes on into the next day;
// - a date and time: counted from the first reading.
import { Refusal } from "./csv.ts";

export type TimeForm = "mm:ss" | "h:mm:ss" | "date-time" | "sheet-time" | "sheet-date";

export interface TimeValue {
  /** 1-based row of the file */
  row: number;
  /** seconds: since midnight (clock forms), as written (mm:ss), or since 1970 (dates) */
  seconds: number;
  form: TimeForm;
  /** as written, for the note */
  text: string;
}

const COLON_TIME = /^(\d{1,3}):([0-5]?\d)(?::([0-5]?\d(?:\.\d+)?))?$/;
const DATE_TIME = /^(\d{4})-(\d{1,2})-(\d{1,2})[ T](\d{1,2}):(\d{2})(?::(\d{2}(?:\.\d+)?))?Z?$/;

/** A text cell as a time, or null when it is not one. */
export function parseTimeText(text: string, row: number): TimeValue | null {
  const s = text.trim();
  let m = COLON_TIME.exec(s);
  if (m) {
    if (m[3] === undefined) return { row, seconds: Number(m[1]) * 60 + Number(m[2]), form: "mm:ss", text: s };
    return { row, seconds: Number(m[1]) * 3600 + Number(m[2]) * 60 + Number(m[3]), form: "h:mm:ss", text: s };
  }
  m = DATE_TIME.exec(s);
  if (m) {
    const ms = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]), Number(m[4]), Number(m[5]), 0) + Number(m[6] ?? 0) * 1000;
    if (Number.isFinite(ms)) return { row, seconds: ms / 1000, form: "date-time", text: s };
  }
  return null;
}

/** Excel's day zero as exceljs gives time-only cells (30 December 1899, UTC). */
const SHEET_EPOCH_MS = Date.UTC(1899, 11, 30);

/** A workbook's date cell (exceljs gives a Date): a time of day or duration, or a full date. */
export function sheetTimeValue(date: Date, row: number): TimeValue {
  const ms = date.getTime() - SHEET_EPOCH_MS;
  const text = date.toISOString().replace("T", " ").replace(/\.000Z$/, "");
  if (ms >= 0 && ms < 2 * 86400_000) return { row, seconds: ms / 1000, form: "sheet-time", text: text.slice(11) };
  return { row, seconds: date.getTime() / 1000, form: "sheet-date", text };
}

/** "14:05", "14:05:30" as seconds after midnight; null when it is not a clock time. */
export function parseStart(text: string): number | null {
  const m = /^([01]?\d|2[0-3])[:.]([0-5]\d)(?:[:.]([0-5]\d))?$/.exec(text.trim());
  if (!m) return null;
  return Number(m[1]) * 3600 + Number(m[2]) * 60 + Number(m[3] ?? 0);
}

const CLOCK_WORDS = /clock|time of day|wall|hh:mm|uhrzeit|heure|hora/i;

export interface ElapsedTimes {
  /** seconds since the start, per file row */
  seconds: Map<number, number>;
  /** how the column was read, for the person who sent it */
  note: string;
}

function clockText(s: number): string {
  const two = (n: number) => String(Math.floor(n)).padStart(2, "0");
  const d = ((s % 86400) + 86400) % 86400;
  return `${two(d / 3600)}:${two((d % 3600) / 60)}:${two(d % 60)}`;
}

/**
 * A column's times as seconds elapsed. `column` names it in the note ("column A (time)"), `header`
 * is the text above it (a clock word there makes mm:ss a clock's hh:mm), `start` the clock time of
 * mixing in seconds after midnight, when the group gave one.
 */
export function elapsedTimes(values: TimeValue[], column: string, header: string, start: number | null): ElapsedTimes {
  const seconds = new Map<number, number>();
  if (!values.length) return { seconds, note: "" };
  const dated = values.some((v) => v.form === "date-time" || v.form === "sheet-date");
  const twoPart = values.every((v) => v.form === "mm:ss");
  const clockHint = CLOCK_WORDS.test(header);
  // two-part clock readings are hours and minutes
  const asClock = (v: TimeValue) => (v.form === "mm:ss" && (clockHint || start !== null) ? { ...v, seconds: v.seconds * 60 } : v);
  const vs = values.map(asClock);
  const first = vs[0];
  let kind: "timer" | "clock-first" | "clock-start";
  if (start !== null) kind = "clock-start";
  else if (dated) kind = "clock-first";
  else if (twoPart) kind = clockHint ? "clock-first" : "timer";
  else kind = first.seconds < 3600 && !clockHint ? "timer" : "clock-first";

  if (kind === "timer") {
    for (const v of vs) seconds.set(v.row, v.seconds);
  } else {
    // Day offset: a clock that passes midnight goes on into the next day (time-only forms).
    let day = 0;
    let prev = vs[0].seconds;
    const onDay = vs.map((v) => {
      if (!dated) {
        if (v.seconds + day * 86400 < prev - 43200) day++;
        prev = v.seconds + day * 86400;
        return prev;
      }
      return v.seconds;
    });
    let zero = onDay[0];
    if (kind === "clock-start") {
      zero = dated ? Math.floor(onDay[0] / 86400) * 86400 + start! : start!;
      // a start in the evening before readings after midnight
      if (!dated && onDay[0] - zero < -43200) zero -= 86400;
      const before = vs.findIndex((_, i) => onDay[i] < zero - 0.5);
      if (before >= 0) {
        throw new Refusal(
          `Row ${vs[before].row}, ${column}: the time ${vs[before].text} is before the start you gave (${clockText(start!)}). Give the clock time at which the reactants were mixed, or leave the start empty to count from the first reading.`,
        );
      }
    }
    vs.forEach((v, i) => seconds.set(v.row, onDay[i] - zero));
  }

  const formWords = dated
    ? "dates with clock times"
    : twoPart
      ? kind === "timer" ? "times written mm:ss (minutes:seconds)" : "clock times written hh:mm"
      : kind === "timer" ? "times written h:mm:ss (hours:minutes:seconds)" : "clock times (hh:mm:ss)";
  const from =
    kind === "timer"
      ? "read as time elapsed since mixing"
      : kind === "clock-start"
        ? `read as seconds since the start you gave (${clockText(start!)})`
        : `read as seconds since the first reading (row ${first.row}, ${first.text}); if the first reading was not taken at mixing, give the clock time of mixing as the start`;
  const example = values.length > 1 ? ` For example row ${values[1].row}, ${values[1].text}, is ${seconds.get(values[1].row)} s.` : "";
  return { seconds, note: `${column[0].toUpperCase()}${column.slice(1)} holds ${formWords}, ${from}.${example}` };
}

/**
 * Columns of a CSV table written as times ("03:00", "1:03:00", "14:05:00"): at least three such
 * cells, and most of the column's filled cells below the first. Their cells become seconds
 * elapsed; the columns' indexes and a note for each are returned.
 */
export function convertTimeColumns(rows: Array<{ rowNumber: number; cells: Array<number | string | null> }>, start: number | null): { columns: number[]; notes: string[] } {
  const width = rows.reduce((w, r) => Math.max(w, r.cells.length), 0);
  const columns: number[] = [];
  const notes: string[] = [];
  for (let c = 0; c < width; c++) {
    const values: TimeValue[] = [];
    let firstAt = -1;
    let filledAfter = 0;
    rows.forEach((r, i) => {
      const cell = r.cells[c];
      if (typeof cell !== "string") return;
      const v = parseTimeText(cell, r.rowNumber);
      if (v) {
        if (firstAt < 0) firstAt = i;
        values.push(v);
      }
      if (firstAt >= 0 && cell.trim() !== "") filledAfter++;
    });
    if (values.length < 3 || values.length < filledAfter / 2) continue;
    // The header is the text just above the first time (a units row may sit between).
    const above = rows.slice(Math.max(0, firstAt - 2), firstAt).map((r) => r.cells[c]).filter((x): x is string => typeof x === "string" && x.trim() !== "");
    const header = above.join(" ");
    const name = above[0] ? `column ${letterOf(c)} (${above[0].trim()})` : `column ${letterOf(c)}`;
    const { seconds, note } = elapsedTimes(values, name, header, start);
    for (const r of rows) {
      const s = seconds.get(r.rowNumber);
      if (s !== undefined) r.cells[c] = s;
    }
    columns.push(c);
    notes.push(note);
  }
  return { columns, notes };
}

function letterOf(index: number): string {
  let s = "";
  let n = index + 1;
  while (n > 0) {
    const r = (n - 1) % 26;
    s = String.fromCharCode(65 + r) + s;
    n = Math.floor((n - 1) / 26);
  }
  return s;
}
