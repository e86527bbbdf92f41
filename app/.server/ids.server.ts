// Every id that arrives in a path or a form is parsed here: a positive whole number that fits
// PostgreSQL's integer, or nothing. A bad id never reaches the database (no NaN, no 500).
import { data } from "react-router";

const MAX_INT4 = 2147483647;

/** The id in `raw`, or null when it is not a plain positive whole number in range. */
export function parseId(raw: unknown): number | null {
  if (typeof raw !== "string" && typeof raw !== "number") return null;
  const text = String(raw).trim();
  if (!/^[1-9][0-9]{0,9}$/.test(text)) return null;
  const id = Number(text);
  return id <= MAX_INT4 ? id : null;
}

/** An id from the URL; a bad one is a page that does not exist (404). */
export function pathId(raw: string | undefined, message = "There is nothing at this address. Check the link."): number {
  const id = parseId(raw);
  if (id === null) throw data({ message }, { status: 404 });
  return id;
}

/** An id from a submitted form; a bad one is a malformed request (400), answered as the page's actions answer. */
export function formId(form: FormData, field: string): number | null {
  return parseId(form.get(field));
}
