// Opens a workbook in LibreOffice Calc (headless) and returns every sheet as CSV rows, the way a
// person's spreadsheet program reads the file. Each call gets its own profile folder (two runs
// sharing one block each other), and since soffice exits 0 even when it fails, the output files
// are checked instead.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import Papa from "papaparse";

export const SOFFICE = process.env.SOFFICE_PATH ?? "/usr/bin/soffice";

// UTF-8 (76), comma (44), double quote (34), all sheets (-1), values as stored, not as shown.
const CSV_FILTER = "csv:Text - txt - csv (StarCalc):44,34,76,1,,0,false,true,false,false,false,-1";

export function libreOfficeSheets(xlsx: Uint8Array, sheetNames: string[]): Record<string, string[][]> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ratebook-lo-"));
  try {
    const file = path.join(dir, "book.xlsx");
    fs.writeFileSync(file, xlsx);
    const res = spawnSync(
      SOFFICE,
      [`-env:UserInstallation=file://${path.join(dir, "profile")}`, "--headless", "--convert-to", CSV_FILTER, "--outdir", path.join(dir, "out"), file],
      { encoding: "utf8", timeout: 120_000 },
    );
    const out: Record<string, string[][]> = {};
    for (const name of sheetNames) {
      // LibreOffice names each file book-<sheet>.csv, with characters a file name cannot hold replaced.
      const csv = path.join(dir, "out", `book-${name.replace(/[/\\:*?"<>|]/g, "_")}.csv`);
      if (!fs.existsSync(csv)) {
        throw new Error(`LibreOffice wrote no CSV for sheet "${name}" (found ${fs.existsSync(path.join(dir, "out")) ? fs.readdirSync(path.join(dir, "out")).join(", ") : "nothing"}):\n${res.stdout}\n${res.stderr}`);
      }
      out[name] = Papa.parse<string[]>(fs.readFileSync(csv, "utf8"), { skipEmptyLines: true }).data;
    }
    return out;
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
