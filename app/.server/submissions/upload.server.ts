// Reads an upload request as it streams in: one file of at most MAX_UPLOAD_BYTES and a few text
// fields. The parser stops reading the moment the file passes the limit, so a huge body is never
// held in memory; that becomes a 413 with a message (JSON for the API, a page error otherwise).
import { parseFormData } from "@remix-run/form-data-parser";
import { MaxFileSizeExceededError, MaxTotalSizeExceededError } from "@remix-run/multipart-parser";
import { data } from "react-router";

export const MAX_UPLOAD_BYTES = 5 * 1024 * 1024;
/** the text fields of an upload form together (column names, units, a reported k) */
const MAX_FIELDS_BYTES = 64 * 1024;

export interface UploadedFile {
  bytes: Uint8Array;
  name: string;
  type: string;
  size: number;
}

export interface UploadForm {
  file: UploadedFile | null;
  fields: Record<string, string>;
}

function fail(status: 400 | 413 | 415, message: string, api: boolean): never {
  if (api) throw Response.json({ errors: [{ path: status === 413 ? "file" : "", message }] }, { status });
  throw data({ message }, { status });
}

export async function readUpload(request: Request, api: boolean): Promise<UploadForm> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data")) {
    fail(415, "Send the readings as multipart/form-data with the file in the field \"file\".", api);
  }
  let file: UploadedFile | null = null;
  let form: FormData;
  try {
    form = await parseFormData(
      request,
      { maxFileSize: MAX_UPLOAD_BYTES, maxFiles: 1, maxHeaderSize: 8 * 1024, maxParts: 40, maxTotalSize: MAX_UPLOAD_BYTES + MAX_FIELDS_BYTES },
      async (upload) => {
        if (upload.fieldName !== "file") return null;
        const bytes = new Uint8Array(await upload.arrayBuffer());
        file = { bytes, name: upload.name || "upload", type: upload.type, size: bytes.byteLength };
        return null;
      },
    );
  } catch (error) {
    const name = (error as Error).name ?? "";
    const message = (error as Error).message ?? "";
    if (error instanceof MaxFileSizeExceededError || error instanceof MaxTotalSizeExceededError) {
      fail(413, `The file is larger than the limit of ${MAX_UPLOAD_BYTES / (1024 * 1024)} MB. A run's readings fit in far less: check that you chose the readings file, or save only the sheet with the readings.`, api);
    }
    if (/MaxFilesExceeded/.test(name)) fail(400, "Send one file at a time.", api);
    fail(400, `The upload could not be read (${message || name}). Try again.`, api);
  }
  const fields: Record<string, string> = {};
  for (const [k, v] of form) if (typeof v === "string") fields[k] = v;
  return { file, fields };
}
