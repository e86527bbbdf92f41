// A role picker that saves as soon as it changes (useFetcher, so the page does not reload),
// with the saving state and any refusal shown beside it. A refused change puts the saved role back.
import { useEffect, useState } from "react";
import { useFetcher } from "react-router";

interface Props {
  id: string;
  /** accessible label, e.g. "Role of Kit" */
  label: string;
  /** the role as saved */
  role: string;
  roles: readonly string[];
  /** hidden fields that tell the action what to change */
  fields: Record<string, string | number>;
  /** text shown for each role, when it differs from the value */
  labels?: Record<string, string>;
}

export function RoleSelect({ id, label, role, roles, fields, labels }: Props) {
  // Both role actions answer { errors: { role?, form? } }.
  const fetcher = useFetcher<{ errors?: Partial<Record<string, string>> }>();
  const error = fetcher.data?.errors?.role ?? fetcher.data?.errors?.form;
  const [value, setValue] = useState(role);
  useEffect(() => {
    if (fetcher.state === "idle") setValue(role);
  }, [fetcher.state, fetcher.data, role]);
  return (
    <fetcher.Form method="post" className="flex flex-wrap items-center gap-x-2 gap-y-1">
      {Object.entries(fields).map(([name, v]) => (
        <input key={name} type="hidden" name={name} value={v} />
      ))}
      <label className="sr-only" htmlFor={id}>{label}</label>
      <select
        id={id}
        name="role"
        value={value}
        aria-describedby={error ? `${id}-error` : undefined}
        className="rounded border border-ink-soft bg-white px-2 py-1"
        onChange={(e) => {
          setValue(e.currentTarget.value);
          fetcher.submit(e.currentTarget.form);
        }}
      >
        {roles.map((r) => <option key={r} value={r}>{labels?.[r] ?? r}</option>)}
      </select>
      {fetcher.state !== "idle" ? <span className="text-sm text-ink-soft">saving…</span> : null}
      {fetcher.state === "idle" && fetcher.data && !error ? (
        <span role="status" className="text-sm text-good"><span aria-hidden="true">✓ </span>Saved: now {labels?.[value] ?? value}</span>
      ) : null}
      {error && fetcher.state === "idle" ? (
        <p id={`${id}-error`} role="alert" className="basis-full text-sm font-bold text-bad">✕ {error}</p>
      ) : null}
    </fetcher.Form>
  );
}
