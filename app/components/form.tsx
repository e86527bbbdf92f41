// Small form pieces: each field shows its own message beside it and keeps what was typed.
import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from "react";

interface FieldProps extends InputHTMLAttributes<HTMLInputElement> {
  label: string;
  name: string;
  error?: string;
  hint?: ReactNode;
}

export function Field({ label, name, error, hint, ...input }: FieldProps) {
  const id = `f-${name}`;
  const describedBy = [error ? `${id}-error` : null, hint ? `${id}-hint` : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className="mb-4">
      <label htmlFor={id} className="block font-bold">{label}</label>
      {hint ? <p id={`${id}-hint`} className="text-sm text-ink-soft">{hint}</p> : null}
      <input
        id={id}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`mt-1 w-full rounded border bg-white px-3 py-2 ${error ? "border-bad" : "border-ink-soft"}`}
        {...input}
      />
      <FieldError id={`${id}-error`} message={error} />
    </div>
  );
}

interface SelectProps extends SelectHTMLAttributes<HTMLSelectElement> {
  label: string;
  name: string;
  error?: string;
  options: readonly string[];
  /** text shown for each option value, when it differs from the value */
  labels?: Record<string, string>;
}

export function SelectField({ label, name, error, options, labels, ...select }: SelectProps) {
  const id = `f-${name}`;
  return (
    <div className="mb-4">
      <label htmlFor={id} className="block font-bold">{label}</label>
      <select
        id={id}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className={`mt-1 w-full rounded border bg-white px-3 py-2 ${error ? "border-bad" : "border-ink-soft"}`}
        {...select}
      >
        {options.map((o) => (
          <option key={o} value={o}>{labels?.[o] ?? o}</option>
        ))}
      </select>
      <FieldError id={`${id}-error`} message={error} />
    </div>
  );
}

export function FieldError({ id, message }: { id: string; message?: string }) {
  if (!message) return null;
  return (
    <p id={id} role="alert" className="mt-1 text-sm font-bold text-bad">
      <span aria-hidden="true">✕ </span>
      {message}
    </p>
  );
}

export function FormMessage({ tone, children }: { tone: "error" | "info"; children: ReactNode }) {
  const cls = tone === "error" ? "border-bad bg-bad-soft text-bad" : "border-accent bg-accent-soft text-ink";
  return (
    <div role={tone === "error" ? "alert" : "status"} className={`mb-4 rounded border-l-4 px-4 py-3 ${cls}`}>
      <span className="font-bold">{tone === "error" ? "Problem: " : "Note: "}</span>
      {children}
    </div>
  );
}

export function Button({ children, busy, ...rest }: React.ButtonHTMLAttributes<HTMLButtonElement> & { busy?: boolean }) {
  return (
    <button
      type="submit"
      disabled={busy}
      className="rounded bg-accent px-4 py-2 font-bold text-accent-ink hover:opacity-90 disabled:opacity-60"
      {...rest}
    >
      {busy ? "Working…" : children}
    </button>
  );
}
