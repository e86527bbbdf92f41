// One entry for an uploaded readings file: the content decides how it is read (an .xlsx is a
// zip archive), not the name, so a spreadsheet renamed .csv still reads and a PNG renamed .csv is refused.
import { readCsv, startsWith, ZIP_SIGNATURE, type ReadOptions } from "~/lib/readings/csv";
import type { RawTable } from "~/lib/readings/table";
import { readXlsx } from "./xlsx.server";

export const XLSX_TYPE = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";

export async function readReadingsFile(bytes: Uint8Array, fileName: string, options: ReadOptions = {}): Promise<RawTable> {
  if (startsWith(bytes, ZIP_SIGNATURE)) return readXlsx(bytes, fileName, options);
  return readCsv(bytes, fileName, options);
}

/** The content type stored with an original: what the bytes are, whatever the browser said. */
export function contentTypeOf(bytes: Uint8Array, fileName: string, declared: string): string {
  if (startsWith(bytes, ZIP_SIGNATURE)) return XLSX_TYPE;
  if (/\.csv$/i.test(fileName) || declared === "" || declared === "application/octet-stream") return "text/csv";
  return declared.slice(0, 100);
}
