// The one way route modules read a request body: counted while it streams in, so a body past
// the limit is refused with 413 the moment the limit is passed, whether or not it declared its
// length (chunked bodies have no Content-Length). Uploads get their limit from the upload parser
// (@remix-run/form-data-parser's maxFileSize) instead.
import { data } from "react-router";

export const BODY_LIMITS = {
  /** ordinary page forms (sign-in, invitations, role changes, ...) */
  form: 64 * 1024,
  /** JSON API requests; a fit request with 100 000 readings is about 3 MB */
  json: 8 * 1024 * 1024,
} as const;

interface ReadOptions {
  /** bytes; defaults to BODY_LIMITS.form or BODY_LIMITS.json */
  limit?: number;
  /** answer as the JSON API does ({ errors: [...] }) instead of a page error */
  api?: boolean;
}

function sizeText(bytes: number) {
  return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(bytes % (1024 * 1024) ? 1 : 0)} MiB` : `${Math.round(bytes / 1024)} KiB`;
}

function refuse(status: 400 | 413, message: string, api: boolean): never {
  // The answer goes out at once; Node's server discards whatever of the body is still arriving
  // (closing the connection instead makes clients that are still sending miss the 413).
  if (api) throw Response.json({ errors: [{ path: "", message }] }, { status });
  throw data({ message }, { status });
}

/** The body's bytes, or a thrown 413 once more than `limit` bytes have arrived. */
export async function readBodyBytes(request: Request, limit: number, api = false): Promise<Uint8Array<ArrayBuffer>> {
  const tooLarge = () => refuse(413, `The request body is larger than the limit of ${sizeText(limit)}.`, api);
  const declared = request.headers.get("content-length");
  if (declared !== null && Number(declared) > limit) tooLarge();
  if (!request.body) return new Uint8Array(new ArrayBuffer(0));
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      // Stop reading: the rest of the body is never pulled into memory. (Cancelling the stream
      // would make the Node adapter destroy the socket before the 413 could be sent.)
      reader.releaseLock();
      tooLarge();
    }
    chunks.push(value);
  }
  const bytes = new Uint8Array(new ArrayBuffer(total));
  let at = 0;
  for (const c of chunks) {
    bytes.set(c, at);
    at += c.byteLength;
  }
  return bytes;
}

/** A JSON body; 400 with the parser's message when it is not JSON. */
export async function readJson(request: Request, options: ReadOptions = {}): Promise<unknown> {
  const api = options.api ?? true;
  const bytes = await readBodyBytes(request, options.limit ?? BODY_LIMITS.json, api);
  try {
    return JSON.parse(new TextDecoder().decode(bytes));
  } catch (error) {
    refuse(400, `The body is not valid JSON: ${(error as Error).message}`, api);
  }
}

/** A form body (urlencoded or multipart without files worth streaming). */
export async function readForm(request: Request, options: ReadOptions = {}): Promise<FormData> {
  const api = options.api ?? false;
  const bytes = await readBodyBytes(request, options.limit ?? BODY_LIMITS.form, api);
  const type = request.headers.get("content-type") ?? "";
  if (type.startsWith("multipart/form-data")) {
    try {
      return await new Response(bytes, { headers: { "content-type": type } }).formData();
    } catch {
      refuse(400, "The form data could not be read.", api);
    }
  }
  const form = new FormData();
  for (const [k, v] of new URLSearchParams(new TextDecoder().decode(bytes))) form.append(k, v);
  return form;
}

/** A copy of `request` whose body is `form` (for libraries that read the body themselves). */
export function withFormBody(request: Request, form: FormData): Request {
  const body = new URLSearchParams();
  for (const [k, v] of form) if (typeof v === "string") body.append(k, v);
  const headers = new Headers(request.headers);
  headers.set("content-type", "application/x-www-form-urlencoded");
  headers.delete("content-length");
  return new Request(request.url, { method: request.method, headers, body });
}
