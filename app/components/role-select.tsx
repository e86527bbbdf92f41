// A role picker that saves as soon as it changes (useFetcher, so the page does not reload),
// with the saving state and any refusal shown beside it.
import { useFetcher } from "react-router";

interface Props {
  id: string;
  /** accessible label, e.g. "Role of Kit" */
  label: string;
  role: string;
  roles: readonly string[];
  /** hidden fields that tell the action what to change */
  fields: Record<string, string | number>;
}

export function RoleSelect({ id, label, role, roles, fields }: Props) {
  // Both role actions answer { errors: { role?, form? } }.
  const fetcher = useFetcher<{ errors?: Partial<Record<string, string>> }>();
  const error = fetcher.data?.errors?.role ?? fetcher.data?.errors?.form;
  return (
    <fetcher.Form method="post" className="flex items-center gap-2">
      {Object.entries(fields).map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <label className="sr-only" htmlFor={id}>{label}</label>
      <select
        id={id}
        name="role"
        defaultValue={role}
        className="rounded border border-ink-soft bg-white px-2 py-1"
        onChange={(e) => fetcher.submit(e.currentTarget.form)}
      >
        {roles.map((r) => <option key={r} value={r}>{r}</option>)}
      </select>
      {fetcher.state !== "idle" ? <span className="text-sm text-ink-soft">saving…</span> : null}
      {error ? <span role="alert" className="text-sm font-bold text-bad">✕ {error}</span> : null}
    </fetcher.Form>
  );
}
