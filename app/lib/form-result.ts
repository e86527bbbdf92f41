// Reading a Conform submission result (the action's reply) in a component: the message for a
// field and what was typed in it, so a form that comes back with errors keeps every value.
import type { SubmissionResult } from "@conform-to/react";

export type FormResult = SubmissionResult<string[]> | undefined | null;

export function fieldError(result: FormResult, name: string): string | undefined {
  return result?.error?.[name]?.[0];
}

/** The submitted value at a Conform path such as `benches[2].CA0`. */
export function typed(result: FormResult, name: string): string | undefined {
  let cur: unknown = result?.initialValue;
  for (const part of name.replace(/\[(\d+)\]/g, ".$1").split(".")) {
    if (cur === null || typeof cur !== "object") return undefined;
    cur = (cur as Record<string, unknown>)[part];
  }
  return typeof cur === "string" ? cur : undefined;
}
