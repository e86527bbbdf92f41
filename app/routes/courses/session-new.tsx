// The feed designer: a new practical's numbers, one proposed (CA0, CB0, T) per bench with its
// predicted time to the target conversion, edited freely with the checks rerun as one types.
import { useEffect, useRef, useState } from "react";
import { data, Form, redirect, useFetcher, useNavigation } from "react-router";
import { FEED_RATIO_HEADER } from "~/lib/planning/feed-ratio";
import type { Route } from "./+types/session-new";
import { requireCourseFromPath } from "~/.server/guards.server";
import { readForm } from "~/.server/body.server";
import { reactionSystemsOf } from "~/.server/planning/reactions.server";
import {
  DEFAULT_RUBRIC,
  courseReaction,
  createSession,
  groupProblems,
  parseDesignForm,
  parseRubricForm,
  rubricOf,
  predictBench,
  proposeBenches,
  reactionForDesign,
  rubricExampleFor,
  rubricFormValues,
  sessionForDesign,
} from "~/.server/planning/sessions.server";
import type { RubricExample } from "~/lib/marking/rubric-example";
import { partText } from "~/lib/marking/rubric-view";
import { sig } from "~/lib/format";
import type { BenchFeed, BenchPrediction, Problem } from "~/lib/planning/feed-design";
import { fieldError, typed, type FormResult } from "~/lib/form-result";
import { minutes, mL } from "~/lib/planning/format";
import { Button, Field, FormMessage } from "~/components/form";
import { PageTitle, TableBox } from "~/components/page";
import { CurveThumb } from "~/components/planning/curve-thumb";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Design a practical · Ratebook" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseFromPath(request, params.courseId, ["instructor"]);
  const systems = await reactionSystemsOf(course.id);
  return {
    course: { id: course.id, code: course.code, title: course.title, timeZone: course.timeZone },
    systems: systems.map((s) => ({ id: s.id, name: s.name, a: s.coeffA, b: s.coeffB, speciesA: s.speciesA, speciesB: s.speciesB })),
    // what the default rubric gives the example runs on the first reaction system (staff only page)
    example: systems.length ? rubricExampleFor(systems[0], DEFAULT_RUBRIC) : null,
    defaults: {
      date: new Date(Date.now() + 14 * 86400e3).toISOString().slice(0, 10),
      slotMinutes: "180",
      setupMinutes: "30",
      reactorVolumeMl: "250",
      stockAMolL: "0.1",
      stockBMolL: "0.1",
      samplingIntervalS: "60",
      targetConversionPct: "80",
      benchCount: "6",
      CA0: "0.01",
      ratioMin: "0.5",
      ratioMax: "2",
      tempMinC: "20",
      tempMaxC: "35",
      ...rubricFormValues(DEFAULT_RUBRIC),
    } as Record<string, string>,
  };
}

type Row = BenchFeed & { prediction: BenchPrediction | null };
type ActionData = { result: FormResult; rows: Row[] | null; proposal: number; formErrors: string[] };
type ExampleAnswer = { example: RubricExampleView | null; problem: string | null };
type RubricExampleView = { outOf: { experiment: number; analysis: number }; runs: RubricExample[] };

export async function action({ request, params }: Route.ActionArgs) {
  const { user, course } = await requireCourseFromPath(request, params.courseId, ["instructor"]);
  const form = await readForm(request);
  if (form.get("intent") === "example") {
    // the live example of the rubric being edited: the real marking on invented runs
    const rs = await courseReaction(course.id, Number(form.get("reactionSystemId")));
    const parsed = parseRubricForm(form);
    if (!rs || parsed.status !== "success") return data<ExampleAnswer>({ example: null, problem: rs ? "Fix the rubric's fields to see the example." : "Choose a reaction system." });
    return data<ExampleAnswer>({ example: rubricExampleFor(rs, rubricOf(parsed.value)), problem: null });
  }
  const intent = form.get("intent") === "save" ? "save" : "propose";
  const submission = parseDesignForm(form, intent);
  const proposal = Number(form.get("proposal") ?? 0);
  const typedRows = (): Row[] | null => {
    const rows: Row[] = [];
    for (let i = 0; form.has(`benches[${i}].label`); i++) {
      rows.push({ label: String(form.get(`benches[${i}].label`)), CA0: Number(form.get(`benches[${i}].CA0`)), CB0: Number(form.get(`benches[${i}].CB0`)), temperatureC: Number(form.get(`benches[${i}].temperatureC`)), prediction: null });
    }
    return rows.length ? rows : null;
  };
  if (submission.status !== "success") {
    return data<ActionData>({ result: submission.reply(), rows: typedRows(), proposal, formErrors: [] }, { status: 400 });
  }
  const value = submission.value;
  const rs = await courseReaction(course.id, value.reactionSystemId);
  if (!rs) return data<ActionData>({ result: submission.reply({ fieldErrors: { reactionSystemId: ["Choose a reaction system of this course."] } }), rows: typedRows(), proposal, formErrors: [] }, { status: 400 });
  const reaction = reactionForDesign(rs);
  const session = sessionForDesign(value);
  if ("benchCount" in value) {
    const design = proposeBenches(reaction, value);
    if (!design.ok) return data<ActionData>({ result: submission.reply({ fieldErrors: groupProblems(design.problems) }), rows: typedRows(), proposal, formErrors: [] }, { status: 400 });
    const rows = design.benches.map((b) => ({ ...b, prediction: predictBench(reaction, session, b) }));
    return data<ActionData>({ result: submission.reply(), rows, proposal: proposal + 1, formErrors: [] });
  }
  const saved = await createSession(user, course.id, value);
  if (!saved.ok) {
    const formErrors = Object.entries(saved.errors).filter(([k]) => k.startsWith("benches") || k === "").flatMap(([, v]) => v);
    return data<ActionData>({ result: submission.reply({ fieldErrors: saved.errors }), rows: typedRows(), proposal, formErrors }, { status: 400 });
  }
  throw redirect(`/sessions/${saved.value.id}`);
}

const RUBRIC_FIELDS = ["fullWithinPct", "partialWithinPct", "partialFraction", "analysisMarks", "analysisFullWithinPct", "analysisPartialWithinPct", "analysisPartialFraction", "latePenaltyPct", "correctionCostPct"];

interface CheckAnswer {
  problems: Problem[];
  benches: Array<BenchPrediction | null>;
}

export default function DesignPractical({ loaderData, actionData: answer }: Route.ComponentProps) {
  const { course, systems, defaults } = loaderData;
  const actionData = answer && "result" in answer ? (answer as ActionData) : undefined;
  const result = actionData?.result;
  const busy = useNavigation().state === "submitting";
  const v = (name: string) => typed(result, name) ?? defaults[name];
  const e = (name: string) => fieldError(result, name);
  const [rows, setRows] = useState<Row[]>(actionData?.rows ?? []);
  const proposal = actionData?.proposal ?? 0;
  useEffect(() => setRows(actionData?.rows ?? []), [actionData]);
  const check = useFetcher<CheckAnswer>();
  const exampleFetcher = useFetcher<ExampleAnswer>();
  const example = exampleFetcher.data ? exampleFetcher.data.example : loaderData.example;
  const formRef = useRef<HTMLFormElement>(null);
  const [analysisTyped, setAnalysisMarks] = useState(Number(v("analysisMarks")));
  const analysisMarks = Number.isFinite(analysisTyped) && analysisTyped >= 0 && analysisTyped <= 100 ? analysisTyped : null;
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);

  const exampleTimer = useRef<ReturnType<typeof setTimeout> | null>(null);
  // Rerun the checks on the server as the instructor types (no reload); the rubric's example too.
  function recheck() {
    if (exampleTimer.current) clearTimeout(exampleTimer.current);
    exampleTimer.current = setTimeout(() => {
      const f = new FormData(formRef.current!);
      const body = new FormData();
      for (const k of [...RUBRIC_FIELDS, "reactionSystemId"]) body.set(k, String(f.get(k) ?? ""));
      body.set("intent", "example");
      exampleFetcher.submit(body, { method: "post" });
    }, 300);
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => {
      const f = new FormData(formRef.current!);
      const n = (k: string) => Number(f.get(k));
      const benches: BenchFeed[] = [];
      for (let i = 0; f.has(`benches[${i}].label`); i++) {
        benches.push({ label: String(f.get(`benches[${i}].label`)), CA0: n(`benches[${i}].CA0`), CB0: n(`benches[${i}].CB0`), temperatureC: n(`benches[${i}].temperatureC`) });
      }
      if (!benches.length || !n("reactionSystemId")) return;
      const body = {
        reactionSystemId: n("reactionSystemId"),
        session: {
          slotMinutes: n("slotMinutes"),
          setupMinutes: n("setupMinutes"),
          samplingIntervalS: n("samplingIntervalS"),
          reactorVolumeMl: n("reactorVolumeMl"),
          stockAMolL: n("stockAMolL"),
          stockBMolL: n("stockBMolL"),
          targetConversion: n("targetConversionPct") / 100,
        },
        benches,
      };
      check.submit(JSON.parse(JSON.stringify(body)), { method: "post", action: "/api/feed-check", encType: "application/json" });
    }, 250);
  }

  const live = check.data && Array.isArray(check.data.benches) && check.data.benches.length === rows.length ? check.data : null;
  const liveProblems = live?.problems ?? [];
  const formErrors = actionData?.formErrors ?? [];

  if (!systems.length) {
    return (
      <>
        <PageTitle trail={trailFor("Design a practical", course)} sub={course.code}>Design a practical</PageTitle>
        <FormMessage tone="info">
          This course has no reaction system yet. <a className="underline" href={`/courses/${course.id}/reactions`}>Add one to the library</a> first.
        </FormMessage>
      </>
    );
  }

  return (
    <>
      <PageTitle trail={trailFor("Design a practical", course)} sub={`${course.code} · one feed and temperature per bench, checked against the slot`}>Design a practical</PageTitle>
      <Form method="post" noValidate ref={formRef} onChange={recheck} aria-label="Practical and benches">
        <input type="hidden" name="proposal" value={proposal} />
        <div className="grid gap-6 lg:grid-cols-2">
          <fieldset className="rounded border border-rule bg-white p-4">
            <legend className="px-1 text-lg font-bold">The practical</legend>
            <Field label="Title" name="title" defaultValue={v("title")} error={e("title")} />
            <div className="grid grid-cols-2 gap-x-4">
              <Field label="Lab day" name="date" type="date" defaultValue={v("date")} error={e("date")} />
              <Field label={`Upload deadline (${loaderData.course.timeZone})`} name="deadline" type="datetime-local" defaultValue={v("deadline")} error={e("deadline")} hint="On the course's clock" />
            </div>
            <div className="mb-4">
              <label htmlFor="f-reactionSystemId" className="block font-bold">Reaction system</label>
              <select id="f-reactionSystemId" name="reactionSystemId" defaultValue={v("reactionSystemId") ?? String(systems[0].id)} className="mt-1 w-full rounded border border-ink-soft bg-white px-3 py-2" aria-invalid={e("reactionSystemId") ? true : undefined}>
                {systems.map((s) => (
                  <option key={s.id} value={s.id}>{`${s.name} (${s.a === 1 ? "" : `${s.a} `}A + ${s.b === 1 ? "" : `${s.b} `}B)`}</option>
                ))}
              </select>
              {e("reactionSystemId") ? <p role="alert" className="mt-1 text-sm font-bold text-bad">✕ {e("reactionSystemId")}</p> : null}
            </div>
            <div className="grid grid-cols-2 gap-x-4">
              <Field label="Slot (min)" name="slotMinutes" inputMode="numeric" defaultValue={v("slotMinutes")} error={e("slotMinutes")} />
              <Field label="Set-up (min)" name="setupMinutes" inputMode="numeric" defaultValue={v("setupMinutes")} error={e("setupMinutes")} />
              <Field label="Sampling interval (s)" name="samplingIntervalS" inputMode="numeric" defaultValue={v("samplingIntervalS")} error={e("samplingIntervalS")} />
              <Field label="Reactor volume (mL)" name="reactorVolumeMl" inputMode="decimal" defaultValue={v("reactorVolumeMl")} error={e("reactorVolumeMl")} />
              <Field label="Stock of A (mol/L)" name="stockAMolL" inputMode="decimal" defaultValue={v("stockAMolL")} error={e("stockAMolL")} />
              <Field label="Stock of B (mol/L)" name="stockBMolL" inputMode="decimal" defaultValue={v("stockBMolL")} error={e("stockBMolL")} />
              <Field label="Target conversion (%)" name="targetConversionPct" inputMode="decimal" defaultValue={v("targetConversionPct")} error={e("targetConversionPct")} hint="of the limiting reagent" />
            </div>
          </fieldset>
          <div className="space-y-6">
            <fieldset className="rounded border border-rule bg-white p-4">
              <legend className="px-1 text-lg font-bold">Propose benches</legend>
              <div className="grid grid-cols-2 gap-x-4">
                <Field label="Benches" name="benchCount" inputMode="numeric" defaultValue={v("benchCount")} error={e("benchCount")} />
                <Field label="CA0 (mol/L)" name="CA0" inputMode="decimal" defaultValue={v("CA0")} error={e("CA0")} />
                <Field label="Feed ratio M from" name="ratioMin" inputMode="decimal" defaultValue={v("ratioMin")} error={e("ratioMin")} hint={FEED_RATIO_HEADER} />
                <Field label="Feed ratio M to" name="ratioMax" inputMode="decimal" defaultValue={v("ratioMax")} error={e("ratioMax")} hint="1 is the stoichiometric feed" />
                <Field label="Temperature from (°C)" name="tempMinC" inputMode="decimal" defaultValue={v("tempMinC")} error={e("tempMinC")} />
                <Field label="Temperature to (°C)" name="tempMaxC" inputMode="decimal" defaultValue={v("tempMaxC")} error={e("tempMaxC")} />
              </div>
              <Button name="intent" value="propose" busy={busy}>Propose benches</Button>
            </fieldset>
            <fieldset className="rounded border border-rule bg-white p-4" aria-describedby="rubric-note">
              <legend className="px-1 text-lg font-bold">Marking rubric (marks out of 100)</legend>
              <p id="rubric-note" className="mb-3 text-sm text-ink-soft">Two checks share the 100 marks. A deviation within the first band earns the check's marks, within the second its partial share, beyond it none.</p>
              <h3 className="font-bold">Experiment check: {analysisMarks === null ? "—" : sig(100 - analysisMarks, 4)} marks</h3>
              <p className="mb-2 text-sm text-ink-soft">The marking k against the reference k at the bench's temperature.</p>
              <div className="grid grid-cols-2 gap-x-4">
                <Field label="Experiment: full marks within (%)" name="fullWithinPct" inputMode="decimal" defaultValue={v("fullWithinPct")} error={e("fullWithinPct")} hint="of the reference k; applies to the experiment check only" />
                <Field label="Experiment: partial marks within (%)" name="partialWithinPct" inputMode="decimal" defaultValue={v("partialWithinPct")} error={e("partialWithinPct")} />
                <Field label="Experiment: partial share (0–1)" name="partialFraction" inputMode="decimal" defaultValue={v("partialFraction")} error={e("partialFraction")} hint="of the experiment marks" />
              </div>
              <h3 className="mt-2 font-bold">Analysis check: {analysisMarks === null ? "—" : sig(analysisMarks, 4)} marks</h3>
              <p className="mb-2 text-sm text-ink-soft">The group's reported k against the k of their own straight line.</p>
              <div className="grid grid-cols-2 gap-x-4">
                <Field label="Analysis marks (of 100)" name="analysisMarks" inputMode="decimal" defaultValue={v("analysisMarks")} error={e("analysisMarks")} hint="the experiment check gets the rest" onInput={(ev) => setAnalysisMarks(Number((ev.target as HTMLInputElement).value))} />
                <Field label="Analysis: full marks within (%)" name="analysisFullWithinPct" inputMode="decimal" defaultValue={v("analysisFullWithinPct")} error={e("analysisFullWithinPct")} hint="of the group's own straight-line k" />
                <Field label="Analysis: partial marks within (%)" name="analysisPartialWithinPct" inputMode="decimal" defaultValue={v("analysisPartialWithinPct")} error={e("analysisPartialWithinPct")} />
                <Field label="Analysis: partial share (0–1)" name="analysisPartialFraction" inputMode="decimal" defaultValue={v("analysisPartialFraction")} error={e("analysisPartialFraction")} hint="of the analysis marks" />
              </div>
              <h3 className="mt-2 font-bold">Late work and corrected slips</h3>
              <div className="grid grid-cols-2 gap-x-4">
                <Field label="Late penalty (% of the mark)" name="latePenaltyPct" inputMode="decimal" defaultValue={v("latePenaltyPct")} error={e("latePenaltyPct")} />
                <Field label="Each corrected slip costs (% of the mark)" name="correctionCostPct" inputMode="decimal" defaultValue={v("correctionCostPct")} error={e("correctionCostPct")} hint="a unit, the columns or a reading a reviewer corrected" />
              </div>
              <div aria-live="polite" data-testid="rubric-example" className="mt-2">
                <h3 className="font-bold">What this rubric gives (invented runs, marked by the engine)</h3>
                {example ? (
                  <TableBox label="Example marks under this rubric">
                    <table className="w-full border-collapse text-left text-sm">
                      <thead><tr className="border-b-2 border-ink"><th className="px-2 py-1">Run</th><th className="px-2 py-1 text-right">Experiment</th><th className="px-2 py-1 text-right">Analysis</th><th className="px-2 py-1 text-right">Mark</th></tr></thead>
                      <tbody>
                        {example.runs.map((r) => (
                          <tr key={r.key} className="border-b border-rule" data-example={r.key}>
                            <td className="px-2 py-1">{r.label}</td>
                            <td className="num px-2 py-1">{partText(r.experimentPart, example.outOf.experiment)}</td>
                            <td className="num px-2 py-1">{partText(r.analysisPart, example.outOf.analysis)}</td>
                            <td className="num px-2 py-1 font-bold" data-example-mark={r.mark}>{sig(r.mark, 4)} of 100{r.correctionCost ? ` (−${sig(r.correctionCost, 3)} for the correction)` : ""}</td>
                          </tr>
                        ))}
                      </tbody>
                    </table>
                  </TableBox>
                ) : <p className="text-sm text-ink-soft">{exampleFetcher.data?.problem ?? "Choose a reaction system to see the example."}</p>}
              </div>
            </fieldset>
          </div>
        </div>

        <section aria-labelledby="benches-h" className="mt-8">
          <h2 id="benches-h" className="mb-2 text-xl font-bold">Benches {rows.length ? `(${rows.length})` : ""}</h2>
          {!rows.length ? <p className="text-ink-soft">Set the ranges above and press “Propose benches”; then edit any bench.</p> : null}
          {[...formErrors, ...liveProblems.map((p) => p.message)].length ? (
            <FormMessage tone="error">
              <ul className="list-inside list-disc">
                {[...new Set([...formErrors, ...liveProblems.map((p) => p.message)])].map((m) => <li key={m}>{m}</li>)}
              </ul>
            </FormMessage>
          ) : null}
          {rows.length ? (
            <TableBox label="Proposed benches">
              <table className="w-full border-collapse text-left">
                <thead>
                  <tr className="border-b-2 border-ink">
                    <th className="px-2 py-2">Bench</th>
                    <th className="px-2 py-2">CA0 (mol/L)</th>
                    <th className="px-2 py-2">CB0 (mol/L)</th>
                    <th className="px-2 py-2">T (°C)</th>
                    <th className="px-2 py-2 text-right">{FEED_RATIO_HEADER}</th>
                    <th className="px-2 py-2 text-right">To target</th>
                    <th className="px-2 py-2 text-right">Stocks A + B, water</th>
                    <th className="px-2 py-2">Predicted CA(t)</th>
                    <th className="min-w-64 px-2 py-2">Checks</th>
                  </tr>
                </thead>
                <tbody>
                  {rows.map((r, i) => {
                    const p = live ? live.benches[i] : r.prediction;
                    const name = (k: string) => `benches[${i}].${k}`;
                    const cell = (k: "CA0" | "CB0" | "temperatureC", label: string) => (
                      <td className="px-2 py-1">
                        <input aria-label={`${label}, bench ${r.label}`} name={name(k)} defaultValue={String(r[k])} inputMode="decimal" className="w-24 rounded border border-ink-soft px-2 py-1 text-right tabular-nums" aria-invalid={fieldError(result, name(k)) ? true : undefined} />
                      </td>
                    );
                    return (
                      <tr key={`${proposal}-${i}`} className="border-b border-rule align-top">
                        <td className="px-2 py-1">
                          <input aria-label={`Label of bench ${i + 1}`} name={name("label")} defaultValue={r.label} className="w-14 rounded border border-ink-soft px-2 py-1" />
                        </td>
                        {cell("CA0", "CA0")}
                        {cell("CB0", "CB0")}
                        {cell("temperatureC", "Temperature")}
                        <td className="num px-2 py-1">{p ? p.ratio.toFixed(2) : "—"}</td>
                        <td className="num px-2 py-1">{p ? minutes(p.minutesToTarget) : "—"}</td>
                        <td className="num px-2 py-1 text-sm">{p ? `${mL(p.volumes.stockAMl)} + ${mL(p.volumes.stockBMl)}, ${mL(p.volumes.waterMl)}` : "—"}</td>
                        <td className="px-2 py-1">{p ? <CurveThumb curve={p.curve} label={r.label} /> : null}</td>
                        <td className="px-2 py-1 text-sm">
                          {p && p.warnings.length ? (
                            <ul className="space-y-1">
                              {p.warnings.map((w) => (
                                <li key={w.code} className="font-bold text-warn"><span aria-hidden="true">▲ </span>Warning: {w.message}</li>
                              ))}
                            </ul>
                          ) : p ? (
                            <span className="text-good">✓ fits the slot</span>
                          ) : null}
                        </td>
                      </tr>
                    );
                  })}
                </tbody>
              </table>
            </TableBox>
          ) : null}
          <p className="mt-2 text-sm text-ink-soft" aria-live="polite">
            {check.state !== "idle" ? "Checking…" : live ? "Checked just now against the reference." : rows.length ? "Edit a bench and the checks run again." : ""}
          </p>
          {rows.length ? <div className="mt-4"><Button name="intent" value="save" busy={busy}>Save practical</Button></div> : null}
        </section>
      </Form>
    </>
  );
}
