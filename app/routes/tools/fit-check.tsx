// Staff check one run's data against the engine before marking: paste, fit, look.
import { useState } from "react";
import { useFetcher } from "react-router";
import type { Route } from "./+types/fit-check";
import { requireCourseStaff } from "~/.server/guards.server";
import { buildFitRequest, LAW_ORDERS, MEASURED_KINDS, problemFromEnginePath, type FitFormValues, type FormProblem } from "~/lib/fit-form";
import { inventedExample } from "~/lib/example-run";
import type { FitResult } from "~/lib/kinetics";
import { Button, Field, FormMessage, SelectField } from "~/components/form";
import { PageTitle } from "~/components/page";
import { FitReport } from "~/components/fit-report";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Check a data set · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  // Follows the course role: anyone who is an instructor or demonstrator in some course.
  await requireCourseStaff(request);
  return null;
}

const EMPTY: FitFormValues = {
  a: "1", b: "1", law: "AB", CA0: "", CB0: "", concentrationUnit: "mol/L", timeUnit: "min", kind: "concentrationA",
  S0: "", Sinf: "", species: "A", epsilon: "", pathCm: "", baseline: "", temperatureC: "", refK: "", TrefC: "", EaKJ: "",
  tolerancePct: "", data: "",
};

type ApiReply = FitResult | { errors: Array<{ path: string; message: string }> };

export default function FitCheck() {
  const [values, setValues] = useState<FitFormValues>(EMPTY);
  const [formProblems, setFormProblems] = useState<FormProblem[]>([]);
  const [note, setNote] = useState<string | null>(null);
  const [sent, setSent] = useState<{ points: Array<[number, number]>; lines: number[]; kind: FitFormValues["kind"] }>({ points: [], lines: [], kind: "concentrationA" });
  const fetcher = useFetcher<ApiReply>();
  const reply = fetcher.state === "idle" ? fetcher.data : undefined;
  const engineProblems = reply && "errors" in reply ? reply.errors.map((e) => problemFromEnginePath(e.path, e.message, sent.lines)) : [];
  const problems = [...formProblems, ...engineProblems];
  // A result is shown only for the readings now on the form, not after the form found problems.
  const result = !formProblems.length && reply && !("errors" in reply) ? reply : null;
  const errorFor = (f: keyof FitFormValues) => problems.filter((p) => p.field === f).map((p) => p.message).join(" ") || undefined;
  const set = (f: keyof FitFormValues) => (e: { currentTarget: { value: string } }) => setValues({ ...values, [f]: e.currentTarget.value });
  const bind = (f: keyof FitFormValues) => ({ name: f, value: values[f], onChange: set(f), error: errorFor(f) });

  function submit(e: React.FormEvent) {
    e.preventDefault();
    const built = buildFitRequest(values);
    setFormProblems(built.problems);
    setNote(built.note);
    if (built.problems.length) return;
    setSent({ points: built.request.points as Array<[number, number]>, lines: built.lines, kind: values.kind });
    fetcher.submit(built.request as never, { method: "post", action: "/api/fit", encType: "application/json" });
  }

  return (
    <>
      <PageTitle trail={trailFor("Check a data set")} sub="Fit one run's readings with the rate law its feed calls for, and compare k with the reference at its temperature. Nothing is stored.">
        Check a data set
      </PageTitle>
      <p className="mb-4">
        <button type="button" className="text-accent underline" onClick={() => { setValues(inventedExample()); setFormProblems([]); setNote(null); }}>
          Fill in an invented example
        </button>{" "}
        <span className="text-sm text-ink-soft">(made-up demo readings, not a real run)</span>
      </p>
      {problems.length ? (
        <FormMessage tone="error">
          {problems.length === 1 ? "One thing to fix" : `${problems.length} things to fix`}; each is shown beside its field.
        </FormMessage>
      ) : null}
      <form onSubmit={submit} noValidate className="grid gap-x-8 lg:grid-cols-2">
        <fieldset className="mb-4 rounded border border-rule bg-white p-4">
          <legend className="px-1 font-bold">Reaction a A + b B → products</legend>
          <div className="grid grid-cols-2 gap-x-4">
            <Field label="a" inputMode="decimal" {...bind("a")} />
            <Field label="b" inputMode="decimal" {...bind("b")} />
          </div>
          <SelectField label="Rate law (k defined on A: −dCA/dt)" name="law" value={values.law} onChange={set("law")} options={Object.keys(LAW_ORDERS)}
            labels={Object.fromEntries(Object.entries(LAW_ORDERS).map(([k, v]) => [k, v.label]))} />
          <div className="grid grid-cols-3 gap-x-4">
            <Field label="CA0" inputMode="decimal" {...bind("CA0")} />
            <Field label="CB0" inputMode="decimal" {...bind("CB0")} />
            <SelectField label="unit (feed and readings)" name="concentrationUnit" value={values.concentrationUnit} onChange={set("concentrationUnit")} options={["mol/L", "mmol/L"]} />
          </div>
          <div className="grid grid-cols-3 gap-x-4">
            <Field label="Run temperature, °C" inputMode="decimal" {...bind("temperatureC")} />
            <SelectField label="Time unit of the data" name="timeUnit" value={values.timeUnit} onChange={set("timeUnit")} options={["s", "min", "h"]} />
          </div>
        </fieldset>
        <fieldset className="mb-4 rounded border border-rule bg-white p-4">
          <legend className="px-1 font-bold">Reference value (optional)</legend>
          <div className="grid grid-cols-2 gap-x-4">
            <Field label="k at Tref, per second (L/(mol·s) or 1/s)" inputMode="decimal" {...bind("refK")} />
            <Field label="Tref, °C" inputMode="decimal" {...bind("TrefC")} />
            <Field label="Activation energy, kJ/mol" inputMode="decimal" hint="Leave empty if k does not vary with temperature." {...bind("EaKJ")} />
            <Field label="Tolerance, %" inputMode="decimal" hint="Empty: 20 %." {...bind("tolerancePct")} />
          </div>
        </fieldset>
        <fieldset className="mb-4 rounded border border-rule bg-white p-4">
          <legend className="px-1 font-bold">What was measured</legend>
          <SelectField label="Measured quantity" name="kind" value={values.kind} onChange={set("kind")} options={Object.keys(MEASURED_KINDS)} labels={MEASURED_KINDS} error={errorFor("kind")} />
          {values.kind === "signal" ? (
            <div className="grid grid-cols-2 gap-x-4">
              <Field label="Signal at the start, S0" inputMode="decimal" {...bind("S0")} />
              <Field label="Final signal, S∞" inputMode="decimal" hint="Leave empty to fit it." {...bind("Sinf")} />
            </div>
          ) : null}
          {values.kind === "absorbance" ? (
            <div className="grid grid-cols-2 gap-x-4">
              <SelectField label="Absorbing species" name="species" value={values.species} onChange={set("species")} options={["A", "B"]} />
              <Field label="Molar absorptivity, L/(mol·cm)" inputMode="decimal" {...bind("epsilon")} />
              <Field label="Path length, cm" inputMode="decimal" {...bind("pathCm")} />
              <Field label="Baseline absorbance" inputMode="decimal" hint="Optional." {...bind("baseline")} />
            </div>
          ) : null}
        </fieldset>
        <div className="mb-4">
          <label htmlFor="f-data" className="block font-bold">Readings: time, value (one row per line)</label>
          <p id="f-data-hint" className="text-sm text-ink-soft">Paste from a spreadsheet or type: time in the first column, the measured value in the second; tabs, semicolons, commas or spaces between columns; a decimal point or comma; a header line is fine.</p>
          <textarea id="f-data" name="data" rows={10} value={values.data} onChange={set("data")} aria-describedby="f-data-hint f-data-error"
            aria-invalid={errorFor("data") ? true : undefined}
            className={`mt-1 w-full rounded border bg-white px-3 py-2 font-mono text-sm ${errorFor("data") ? "border-bad" : "border-ink-soft"}`} />
          {note && !errorFor("data") ? <p role="status" className="mt-1 text-sm text-ink-soft">{note}</p> : null}
          {problems.filter((p) => p.field === "data").map((p, i) => (
            <p key={i} id={i === 0 ? "f-data-error" : undefined} role="alert" className="mt-1 text-sm font-bold text-bad"><span aria-hidden="true">✕ </span>{p.message}</p>
          ))}
        </div>
        <div className="lg:col-span-2">
          <Button busy={fetcher.state !== "idle"}>Fit</Button>
        </div>
      </form>
      {result ? <FitReport result={result} kind={sent.kind} points={sent.points} lines={sent.lines} /> : null}
    </>
  );
}
