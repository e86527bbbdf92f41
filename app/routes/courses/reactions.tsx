// The course's reaction-system library: what is there, and a form to add one (instructors).
import { data, Form, useNavigation } from "react-router";
import type { Route } from "./+types/reactions";
import { requireCourseFromPath } from "~/.server/guards.server";
import { readForm } from "~/.server/body.server";
import { createReactionSystem, parseReactionForm, reactionSystemsOf } from "~/.server/planning/reactions.server";
import { fieldError, typed, type FormResult } from "~/lib/form-result";
import { PICTOGRAMS } from "~/lib/planning/hazards";
import { Button, Field, FormMessage, SelectField } from "~/components/form";
import { PageTitle } from "~/components/page";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Reaction systems · Ratebook" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseFromPath(request, params.courseId, ["instructor", "demonstrator"]);
  const systems = await reactionSystemsOf(course.id);
  return {
    course: { id: course.id, code: course.code },
    canEdit: role === "instructor",
    systems: systems.map((s) => ({
      id: s.id,
      name: s.name,
      equation: `${s.coeffA === 1 ? "" : s.coeffA + " "}A + ${s.coeffB === 1 ? "" : s.coeffB + " "}B`,
      speciesA: s.speciesA,
      speciesB: s.speciesB,
      law: `−dCA/dt = k·CA${s.orderA === 2 ? "²" : ""}${s.orderB ? "·CB" : ""}`,
      kRef: s.kRef,
      TrefC: s.TrefC,
      EaKJ: s.EaKJ,
      source: s.referenceSource,
      measured: s.measured,
      calibration: s.calibration,
      stocks: s.stocks,
      hazards: s.hazards,
    })),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { user, course } = await requireCourseFromPath(request, params.courseId, ["instructor"]);
  const submission = parseReactionForm(await readForm(request));
  if (submission.status !== "success") return data<{ result: FormResult; saved: string | null }>({ result: submission.reply(), saved: null }, { status: 400 });
  const r = await createReactionSystem(user, course.id, submission.value);
  if (!r.ok) return data<{ result: FormResult; saved: string | null }>({ result: submission.reply({ fieldErrors: r.errors }), saved: null }, { status: 400 });
  return { result: submission.reply({ resetForm: true }) as FormResult, saved: r.value.name };
}

const CALIBRATION_LABELS: Record<string, [string, string]> = {
  conductivityStart: ["initial conductivity", "mS/cm"],
  conductivityEnd: ["final conductivity", "mS/cm"],
  epsilon: ["molar absorptivity", "L/(mol·cm)"],
  pathCm: ["path length", "cm"],
  absorbingSpecies: ["absorbing species", ""],
  titrantMolL: ["titrant", "mol/L"],
  aliquotMl: ["aliquot", "mL"],
  titratedSpecies: ["species titrated", ""],
  titrant: ["titrant is", ""],
  titrationRatio: ["mol titrated per mol titrant", ""],
  quenchMolL: ["quench reagent", "mol/L"],
  quenchMl: ["quench volume", "mL"],
  quenchRatio: ["mol titrated per mol quench reagent", ""],
};

function calibrationText(c: Record<string, unknown>) {
  const parts = Object.entries(c)
    .filter(([, v]) => v !== undefined && v !== "")
    .map(([k, v]) => {
      const [label, unit] = CALIBRATION_LABELS[k] ?? [k, ""];
      return `${label} ${String(v)}${unit ? ` ${unit}` : ""}`;
    });
  return parts.join(", ") || "none";
}

const MEASURED_LABELS = { concentration: "concentration of A", conductivity: "conductivity", absorbance: "absorbance", titration: "titration" };

export default function Reactions({ loaderData, actionData }: Route.ComponentProps) {
  const { course, systems, canEdit } = loaderData;
  const result = actionData?.result;
  const busy = useNavigation().state === "submitting";
  const v = (n: string) => typed(result, n);
  const e = (n: string) => fieldError(result, n);
  return (
    <>
      <PageTitle trail={trailFor("Reaction systems", course)} sub={`${course.code} · the reactions this course's practicals can use`}>Reaction systems</PageTitle>
      {actionData?.saved ? <FormMessage tone="info">{actionData.saved} added to the library.</FormMessage> : null}
      <div className="grid gap-8 lg:grid-cols-[3fr_2fr]">
        <section aria-labelledby="lib-h">
          <h2 id="lib-h" className="mb-3 text-xl font-bold">Library ({systems.length})</h2>
          {!systems.length ? <p>No reaction system yet{canEdit ? ": add one with the form." : "."}</p> : null}
          <ul className="space-y-4">
            {systems.map((s) => (
              <li key={s.id} className="rounded border border-rule bg-white p-4">
                <h3 className="text-lg font-bold">{s.name}</h3>
                <p>{s.equation} → products; A = {s.speciesA}, B = {s.speciesB}; {s.law}</p>
                <p className="text-sm">Reference: k = {s.kRef} {s.law.includes("CB") || s.law.includes("²") ? "L/(mol·s)" : "1/s"} at {s.TrefC} °C, Ea = {s.EaKJ} kJ/mol. {s.source}</p>
                <p className="text-sm">Measured: {MEASURED_LABELS[s.measured]}; calibration: {calibrationText(s.calibration)}.</p>
                <p className="text-sm">Stocks: {s.stocks.map((x) => `${x.label} ${x.concentrationMolL} mol/L`).join("; ") || "none listed"}.</p>
                {s.hazards.length ? (
                  <ul className="mt-1 text-sm">
                    {s.hazards.map((h) => <li key={h.reagent}>⚠ {h.reagent}: {h.hStatements.join(", ")} {h.pictograms.join(", ")} {h.handling}</li>)}
                  </ul>
                ) : null}
              </li>
            ))}
          </ul>
        </section>
        {canEdit ? (
          <section aria-labelledby="add-h" className="self-start rounded border border-rule bg-white p-4">
            <h2 id="add-h" className="mb-3 text-xl font-bold">Add a reaction system</h2>
            <Form method="post" noValidate>
              <Field label="Name" name="name" defaultValue={v("name")} error={e("name")} />
              <div className="grid grid-cols-2 gap-x-3">
                <Field label="Species A" name="speciesA" defaultValue={v("speciesA")} error={e("speciesA")} />
                <Field label="Species B" name="speciesB" defaultValue={v("speciesB")} error={e("speciesB")} />
                <Field label="Coefficient a" name="coeffA" inputMode="decimal" defaultValue={v("coeffA") ?? "1"} error={e("coeffA")} />
                <Field label="Coefficient b" name="coeffB" inputMode="decimal" defaultValue={v("coeffB") ?? "1"} error={e("coeffB")} />
              </div>
              <SelectField label="Rate law" name="rateLaw" options={["1,1", "1,0", "2,0"]} labels={{ "1,1": "first order in A and in B", "1,0": "first order in A", "2,0": "second order in A" }} defaultValue={v("rateLaw") ?? "1,1"} error={e("rateLaw")} />
              <div className="grid grid-cols-3 gap-x-3">
                <Field label="k at Tref (per s, mol/L)" name="kRef" inputMode="decimal" defaultValue={v("kRef")} error={e("kRef")} />
                <Field label="Tref (°C)" name="TrefC" inputMode="decimal" defaultValue={v("TrefC") ?? "25"} error={e("TrefC")} />
                <Field label="Ea (kJ/mol)" name="EaKJ" inputMode="decimal" defaultValue={v("EaKJ")} error={e("EaKJ")} />
              </div>
              <Field label="Source of the reference" name="referenceSource" defaultValue={v("referenceSource")} error={e("referenceSource")} />
              <SelectField label="Measured" name="measured" options={["conductivity", "absorbance", "titration", "concentration"]} labels={MEASURED_LABELS} defaultValue={v("measured") ?? "conductivity"} error={e("measured")} />
              <fieldset className="mb-4 rounded border border-rule p-3">
                <legend className="px-1 font-bold">Calibration (what applies to the measured quantity)</legend>
                <div className="grid grid-cols-2 gap-x-3">
                  <Field label="Initial conductivity (mS/cm)" name="conductivityStart" inputMode="decimal" defaultValue={v("conductivityStart")} error={e("conductivityStart")} />
                  <Field label="Final conductivity (mS/cm)" name="conductivityEnd" inputMode="decimal" defaultValue={v("conductivityEnd")} error={e("conductivityEnd")} />
                  <Field label="Molar absorptivity (L/(mol·cm))" name="epsilon" inputMode="decimal" defaultValue={v("epsilon")} error={e("epsilon")} />
                  <Field label="Path length (cm)" name="pathCm" inputMode="decimal" defaultValue={v("pathCm")} error={e("pathCm")} />
                  <Field label="Titrant (mol/L)" name="titrantMolL" inputMode="decimal" defaultValue={v("titrantMolL")} error={e("titrantMolL")} />
                  <Field label="Aliquot (mL)" name="aliquotMl" inputMode="decimal" defaultValue={v("aliquotMl")} error={e("aliquotMl")} />
                  <SelectField label="Species titrated" name="titratedSpecies" options={["B", "A"]} labels={{ A: "A", B: "B" }} defaultValue={v("titratedSpecies") ?? "B"} error={e("titratedSpecies")} />
                  <Field label="Mol titrated per mol of titrant" name="titrationRatio" inputMode="decimal" hint="1 for HCl against hydroxide, 2 for H2SO4" defaultValue={v("titrationRatio") ?? "1"} error={e("titrationRatio")} />
                  <Field label="Quench reagent (mol/L)" name="quenchMolL" inputMode="decimal" hint="back-titration only: the known excess each aliquot is run into" defaultValue={v("quenchMolL")} error={e("quenchMolL")} />
                  <Field label="Quench volume (mL)" name="quenchMl" inputMode="decimal" hint="back-titration only" defaultValue={v("quenchMl")} error={e("quenchMl")} />
                  <Field label="Mol titrated per mol of quench reagent" name="quenchRatio" inputMode="decimal" hint="back-titration only" defaultValue={v("quenchRatio") ?? "1"} error={e("quenchRatio")} />
                </div>
              </fieldset>
              <div className="grid grid-cols-2 gap-x-3">
                <Field label="Stocks of A (mol/L)" name="stocksA" hint="e.g. 0.05, 0.1" defaultValue={v("stocksA")} error={e("stocksA")} />
                <Field label="Stocks of B (mol/L)" name="stocksB" hint="e.g. 0.1, 0.2" defaultValue={v("stocksB")} error={e("stocksB")} />
              </div>
              <fieldset className="mb-4 rounded border border-rule p-3">
                <legend className="px-1 font-bold">Hazards (GHS)</legend>
                <p className="mb-2 text-sm text-ink-soft">Pictogram codes: {Object.entries(PICTOGRAMS).map(([c, n]) => `${c} ${n}`).join("; ")}.</p>
                {[0, 1].map((i) => (
                  <div key={i} className="mb-2 grid grid-cols-2 gap-x-3 border-b border-rule pb-2">
                    <Field label={`Reagent ${i + 1}`} name={`hazards[${i}].reagent`} defaultValue={v(`hazards[${i}].reagent`)} error={e(`hazards[${i}].reagent`)} />
                    <Field label={`Hazard statements (reagent ${i + 1})`} name={`hazards[${i}].hStatements`} hint="e.g. H290, H314" defaultValue={v(`hazards[${i}].hStatements`)} error={e(`hazards[${i}].hStatements`)} />
                    <Field label={`Pictograms (reagent ${i + 1})`} name={`hazards[${i}].pictograms`} hint="e.g. GHS05" defaultValue={v(`hazards[${i}].pictograms`)} error={e(`hazards[${i}].pictograms`)} />
                    <Field label={`Handling (reagent ${i + 1})`} name={`hazards[${i}].handling`} defaultValue={v(`hazards[${i}].handling`)} error={e(`hazards[${i}].handling`)} />
                  </div>
                ))}
              </fieldset>
              <Button busy={busy}>Add to the library</Button>
            </Form>
          </section>
        ) : null}
      </div>
    </>
  );
}
