// The CPU-heavy work that runs in the compute pool's worker threads (pool.server.ts): reading an
// uploaded readings file, the engine's fits, the workbook and CSV of a gradebook download. Each
// task takes and returns plain data (structured clone: objects, arrays, Maps, Dates, typed
// arrays), never touches the database and throws the same errors as when it ran in the request.
import { runRequest, type AnyRequest } from "~/lib/kinetics";
import { markRun, previewRun, type MarkAttempt, type MarkingContext, type RunInput } from "~/lib/marking/mark-run";
import { parseUpload, runOf, uploadChecked, type ParseOutcome, type UploadChoices } from "../submissions/parse.server";
import type { UploadedFile } from "../submissions/upload.server";
import { exportFile, type ExportData } from "../exports/gradebook-sheets.server";

export interface UploadToRead {
  file: UploadedFile;
  choices: UploadChoices;
  /** what the practical measures */
  measured: string;
}

export const TASKS = {
  /** POST /api/fit: one fit or a pooled Arrhenius fit, already validated */
  fit: (request: AnyRequest) => runRequest(request),
  /** the upload preview: the file read, then the fit at the bench (no reference value) */
  preview: async ({ file, choices, measured, ctx }: UploadToRead & { ctx: MarkingContext }) => {
    const parsed: ParseOutcome = await parseUpload(file, choices, measured);
    if (!parsed.ok) return { parsed, fit: null };
    return { parsed, fit: previewRun(ctx, runOf(parsed, choices)) };
  },
  /** storing an upload: the file read (the stored readings) and range-checked as the marking job will */
  parse: ({ file, choices, measured, ctx }: UploadToRead & { ctx: MarkingContext }): Promise<ParseOutcome> => uploadChecked(ctx, file, choices, measured),
  /** the marking job: the fit and the rubric */
  mark: ({ ctx, run }: { ctx: MarkingContext; run: RunInput }): MarkAttempt => markRun(ctx, run),
  /** a gradebook download's file */
  exportFile: ({ data, format }: { data: ExportData; format: "xlsx" | "csv" }) => exportFile(data, format),
};

export type TaskName = keyof typeof TASKS;
export type TaskInput<T extends TaskName> = Parameters<(typeof TASKS)[T]>[0];
export type TaskOutput<T extends TaskName> = Awaited<ReturnType<(typeof TASKS)[T]>>;
