// How the course total is made: each practical's weight and whether missing work counts as zero.
// Instructors change it here (the action checks it with zod through Conform and audits it);
// everyone else on the page reads it.
import { Form, useNavigation } from "react-router";
import type { CourseGradebookSession } from "~/.server/gradebook/course.server";
import { fieldError, typed, type FormResult } from "~/lib/form-result";
import { sig } from "~/lib/format";
import { Button, FieldError, FormMessage } from "~/components/form";

interface Props {
  sessions: CourseGradebookSession[];
  missingCountsAsZero: boolean;
  canEdit: boolean;
  archived: boolean;
  result: FormResult;
  saved: boolean;
}

function dueText(s: CourseGradebookSession) {
  if (s.released) return "marks released";
  if (s.due) return "due: missing work is missing";
  return "not yet due";
}

export function GradeSettings({ sessions, missingCountsAsZero, canEdit, archived, result, saved }: Props) {
  const busy = useNavigation().state === "submitting";
  const formError = result?.error?.[""]?.[0];
  const zeroTyped = result?.initialValue ? result.initialValue.missingCountsAsZero === "on" : missingCountsAsZero;
  const totalWeight = sessions.reduce((sum, s) => sum + (s.weight > 0 ? s.weight : 0), 0);
  return (
    <section aria-labelledby="settings-h" className="mt-8 rounded border border-rule bg-white p-4">
      <h2 id="settings-h" className="text-xl font-bold">How the total is made</h2>
      <p className="mt-1 mb-3 text-ink-soft">
        The total is the weighted mean of each student's practical marks (their group's latest version). A practical with weight 0 is left out.
        {" "}{missingCountsAsZero ? "Missing work counts as 0 once a practical is due (closed, released or past its deadline)." : "Missing work is left out of the total: it neither helps nor hurts."}
      </p>
      {saved ? <FormMessage tone="info">Saved; the totals above use the new settings. The change is in the audit log.</FormMessage> : null}
      {formError ? <FormMessage tone="error">{formError}</FormMessage> : null}
      {canEdit ? (
        <Form method="post" noValidate>
          <input type="hidden" name="intent" value="settings" />
          <fieldset>
            <legend className="mb-2 font-bold">Weight of each practical</legend>
            {sessions.length === 0 ? <p className="text-ink-soft">No practical is planned yet.</p> : null}
            <div className="grid gap-x-6 gap-y-1 sm:grid-cols-2">
              {sessions.map((s) => {
                const name = `weight-${s.id}`;
                const error = fieldError(result, name);
                const id = `f-${name}`;
                return (
                  <div key={s.id} className="mb-3">
                    <label htmlFor={id} className="block font-bold">{s.title}</label>
                    <p id={`${id}-hint`} className="text-sm text-ink-soft">{s.date} · {dueText(s)} · {s.marked} of {s.benchCount} groups marked</p>
                    <input
                      id={id}
                      name={name}
                      inputMode="decimal"
                      defaultValue={typed(result, name) ?? String(s.weight)}
                      aria-invalid={error ? true : undefined}
                      aria-describedby={`${id}-hint${error ? ` ${id}-error` : ""}`}
                      className={`mt-1 w-28 rounded border bg-white px-3 py-1.5 ${error ? "border-bad" : "border-ink-soft"}`}
                    />
                    <FieldError id={`${id}-error`} message={error} />
                  </div>
                );
              })}
            </div>
          </fieldset>
          <label className="mt-2 mb-4 flex items-start gap-2">
            <input type="checkbox" name="missingCountsAsZero" defaultChecked={zeroTyped} className="mt-1" />
            <span>
              <span className="font-bold">Missing work counts as zero</span>
              <span className="block text-sm text-ink-soft">Only once a practical is due; work not yet due never counts as zero.</span>
            </span>
          </label>
          <Button name="intent" value="settings" busy={busy}>Save how the total is made</Button>
        </Form>
      ) : (
        <>
          <ul className="space-y-1">
            {sessions.map((s) => (
              <li key={s.id}>
                <span className="font-bold">{s.title}</span> · {s.date} · weight <span className="num">{sig(s.weight, 3)}</span>
                {totalWeight > 0 && s.weight > 0 ? <span className="text-ink-soft"> ({sig((100 * s.weight) / totalWeight, 3)} % of the total)</span> : null} · {dueText(s)}
              </li>
            ))}
          </ul>
          <p className="mt-3 text-sm text-ink-soft">
            {archived ? "This course is archived: its settings are read-only until it is taken out of the archive." : "Only the course's instructors change the weights and the missing-work rule."}
          </p>
        </>
      )}
    </section>
  );
}
