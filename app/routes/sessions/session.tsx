// One practical: its benches with predictions and checks, which group works where, telling the
// groups, and the printable sheets. Students see only their own bench.
import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/session";
import { requireUser } from "~/.server/guards.server";
import { pathId, formId } from "~/.server/ids.server";
import { readForm } from "~/.server/body.server";
import { Group } from "~/.server/db/groups.server";
import { assignGroups, benchSchema, detailsSchema, notifyGroups, sessionAccess, sessionView, updateBench, updateSessionDetails } from "~/.server/planning/sessions.server";
import { parseWithZod } from "@conform-to/zod/v4";
import { fixed, minutes } from "~/lib/planning/format";
import { naturalSort } from "~/lib/natural-order";
import { fieldError, typed, type FormResult } from "~/lib/form-result";
import { Button, Field, FormMessage } from "~/components/form";
import { PageTitle, TableBox } from "~/components/page";
import { trailFor } from "~/lib/place";
import { formatDateTime } from "~/lib/dates";
import { wallTime } from "~/lib/time-zone";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.view.title ?? "Practical"} · Ratebook` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const access = await sessionAccess(user, pathId(params.sessionId));
  const view = await sessionView(access);
  const groups = access.staff ? naturalSort(await Group.findAll({ where: { courseId: access.session.courseId } }), (g) => g.name).map((g) => ({ id: g.id, name: g.name })) : [];
  // after "Copy this practical" the new practical's page says what the copy holds and what comes next
  const copied = access.staff && new URL(request.url).searchParams.has("copied");
  return { view, groups, role: access.role, staff: access.staff, copied, course: { id: access.course.id, code: access.course.code, timeZone: access.course.timeZone } };
}

type ActionData = { tone: "info" | "error"; message: string; benchId?: number; details?: FormResult; confirmRemove?: boolean };

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const access = await sessionAccess(user, pathId(params.sessionId));
  if (access.role !== "instructor") throw data({ message: "Only the course's instructors change a practical." }, { status: 403 });
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const reply = (tone: ActionData["tone"], message: string, status = 200, benchId?: number) => data<ActionData>({ tone, message, benchId }, { status });
  if (intent === "assign-auto" || intent === "assign") {
    const mapping: Record<number, number | null> = {};
    const shown: Record<number, number | null> = {};
    if (intent === "assign") {
      for (const [k, v] of form) {
        const m = /^(was-)?bench-(\d+)$/.exec(k);
        if (!m) continue;
        // Empty means "no group"; anything else must be a group id, or nothing changes (a bad value must not empty the bench).
        const groupId = v === "" ? null : formId(form, k);
        if (v !== "" && groupId === null) return reply("error", `The group chosen for bench ${m[2]} is not a group id; reload the page and choose again. Nothing was changed.`, 400);
        (m[1] ? shown : mapping)[Number(m[2])] = groupId;
      }
    }
    const r = await assignGroups(user, access.session, intent === "assign" ? "manual" : "auto", mapping, shown, form.get("confirmRemove") === "yes");
    if (!r.ok) return data<ActionData>({ tone: "error", message: r.message, confirmRemove: "confirm" in r }, { status: 400 });
    return reply("info", `${r.placed} group(s) have a bench${r.unplaced ? `; ${r.unplaced} group(s) have none (more groups than benches)` : ""}.`);
  }
  if (intent === "notify") {
    const r = await notifyGroups(user, access.session);
    if (!r.ok) return reply("error", r.message, 400);
    return reply("info", `${r.sent} e-mail(s) queued to the students of the assigned groups; they go out in the background.`);
  }
  if (intent === "edit-bench") {
    const benchId = formId(form, "benchId");
    const submission = parseWithZod(form, { schema: benchSchema });
    if (benchId === null) return reply("error", "Which bench? The form lost its bench id.", 400);
    if (submission.status !== "success") {
      const msgs = Object.values(submission.error ?? {}).flat().filter(Boolean);
      return reply("error", msgs.join(" ") || "Check the bench's numbers.", 400, benchId);
    }
    const r = await updateBench(user, access.session, access.reaction, benchId, submission.value);
    if (!r.ok) return reply("error", Object.values(r.errors).flat().join(" "), 400, benchId);
    return reply("info", `Bench ${submission.value.label} saved.${access.session.notifiedAt ? " The groups were already told: the change is in the audit log." : ""}`, 200, benchId);
  }
  if (intent === "edit-details") {
    const submission = parseWithZod(form, { schema: detailsSchema });
    if (submission.status !== "success") {
      return data<ActionData>({ tone: "error", message: "Check the practical's details.", details: submission.reply() }, { status: 400 });
    }
    const saved = await updateSessionDetails(user, access.session, submission.value);
    if (!saved.ok) return data<ActionData>({ tone: "error", message: "Check the practical's details.", details: submission.reply({ fieldErrors: saved.errors }) }, { status: 400 });
    return reply("info", `Details saved.${access.session.notifiedAt ? " The groups were already told: the change is in the audit log." : ""}`);
  }
  return reply("error", `Unknown action "${intent}".`, 400);
}

export default function PracticalPage({ loaderData, actionData }: Route.ComponentProps) {
  const { view, groups, staff, role, course } = loaderData;
  const busy = useNavigation().state === "submitting";
  const isInstructor = role === "instructor";
  return (
    <>
      <PageTitle trail={trailFor(null, course, view)} sub={<>{view.date} · {view.slotMinutes} min slot, {view.setupMinutes} min set-up · {view.reaction.name} · status: {view.status}{view.deadline ? <> · deadline {formatDateTime(view.deadline, course.timeZone)}</> : null}</>}>
        {view.title}
      </PageTitle>
      {actionData ? <FormMessage tone={actionData.tone}>{actionData.message}</FormMessage> : null}
      {loaderData.copied && !actionData ? (
        <FormMessage tone="info">This is the copy, with the benches, set-up and rubric of the practical it came from. Put groups on the benches and tell them when you are ready.</FormMessage>
      ) : null}

      {!staff ? (
        <section aria-labelledby="mine-h" className="rounded border border-rule bg-white p-4">
          <h2 id="mine-h" className="mb-2 text-xl font-bold">Your bench</h2>
          {view.benches.length ? (
            view.benches.map((b) => (
              <p key={b.id}>
                Bench {b.label} ({b.groupName}): <Link className="font-bold underline" to={`/sessions/${view.id}/benches/${b.id}/sheet`}>open your bench sheet</Link>
              </p>
            ))
          ) : (
            <p>Your group has no bench in this practical yet. Your instructor assigns the benches; you get an e-mail when they do.</p>
          )}
        </section>
      ) : (
        <>
          <nav aria-label="Print" className="mb-6 flex flex-wrap gap-3">
            <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${view.id}/sheets`}>Bench sheets (print)</Link>
            <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${view.id}/prep`}>Prep list (print)</Link>
            <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/sessions/${view.id}/benches.xlsx`} download>Bench assignment (.xlsx)</a>
            <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/sessions/${view.id}/benches.csv`} download>Bench assignment (.csv)</a>
            {isInstructor ? <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${view.id}/copy`}>Copy this practical</Link> : null}
          </nav>
          <nav aria-label="Results" className="mb-6 flex flex-wrap gap-3">
            <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${view.id}/review`}>Review queue</Link>
            <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${view.id}/class-results`}>Class results</Link>
            <Link className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" to={`/sessions/${view.id}/gradebook`}>Gradebook</Link>
            {/* plain links: downloads are resource routes, not pages for the router to load */}
            <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/sessions/${view.id}/export.xlsx`} download>Download workbook (.xlsx)</a>
            <a className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" href={`/sessions/${view.id}/export.csv`} download>Marks (.csv)</a>
          </nav>
          <section aria-labelledby="benches-h">
            <h2 id="benches-h" className="mb-2 text-xl font-bold">Benches ({view.benches.length})</h2>
            <p className="mb-2 text-sm text-ink-soft">
              Reference (staff only): k = {fixed(view.reaction.reference!.k, 4)} L/(mol·s) at {view.reaction.reference!.TrefC} °C, Ea = {view.reaction.reference!.EaKJ} kJ/mol. Target {Math.round((view.benches[0]?.predicted.targetConversion ?? 0.8) * 100)} % conversion.
            </p>
            <Form method="post">
              <TableBox label="Benches of this practical">
                <table className="w-full border-collapse text-left">
                  <thead>
                    <tr className="border-b-2 border-ink">
                      <th className="px-2 py-2">Bench</th>
                      <th className="px-2 py-2 text-right">CA0 (mol/L)</th>
                      <th className="px-2 py-2 text-right">CB0 (mol/L)</th>
                      <th className="px-2 py-2 text-right">T (°C)</th>
                      <th className="px-2 py-2 text-right">k at T (L/(mol·s))</th>
                      <th className="px-2 py-2 text-right">To target</th>
                      <th className="px-2 py-2">Group</th>
                      <th className="min-w-64 px-2 py-2">Checks</th>
                    </tr>
                  </thead>
                  <tbody>
                    {view.benches.map((b) => (
                      <tr key={b.id} className="border-b border-rule align-top">
                        <td className="px-2 py-1 font-bold">{b.label}</td>
                        <td className="num px-2 py-1">{fixed(b.CA0, 4)}</td>
                        <td className="num px-2 py-1">{fixed(b.CB0, 4)}</td>
                        <td className="num px-2 py-1">{fixed(b.temperatureC, 1)}</td>
                        <td className="num px-2 py-1">{fixed(b.reference!.kAtT, 4)}</td>
                        <td className="num px-2 py-1">{minutes(b.predicted.minutesToTarget)}</td>
                        <td className="px-2 py-1">
                          {isInstructor ? (
                            <>
                              {/* keyed by the saved group: after an automatic fill the menu shows the new group at once */}
                              <select key={`${b.id}-${b.groupId ?? ""}`} aria-label={`Group at bench ${b.label}`} name={`bench-${b.id}`} defaultValue={b.groupId ?? ""} className="rounded border border-ink-soft bg-white px-2 py-1">
                                <option value="">— none —</option>
                                {groups.map((g) => <option key={g.id} value={g.id}>{g.name}</option>)}
                              </select>
                              <input key={`was-${b.id}-${b.groupId ?? ""}`} type="hidden" name={`was-bench-${b.id}`} value={b.groupId ?? ""} />
                            </>
                          ) : (b.groupName ?? "—")}
                        </td>
                        <td className="px-2 py-1 text-sm">
                          {b.warnings!.length ? b.warnings!.map((w) => <p key={w.code} className="font-bold text-warn"><span aria-hidden="true">▲ </span>Warning: {w.message}</p>) : <span className="text-good">✓ fits the slot</span>}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </TableBox>
              {isInstructor ? (
                <div className="mt-3 flex flex-wrap items-center gap-3">
                  {actionData?.confirmRemove ? (
                    <label className="font-bold text-warn">
                      <input type="checkbox" name="confirmRemove" value="yes" className="mr-2" />Yes, take these groups off their benches
                    </label>
                  ) : null}
                  <Button name="intent" value="assign" busy={busy}>Save group assignment</Button>
                  <button type="submit" name="intent" value="assign-auto" className="rounded border border-ink-soft px-4 py-2 hover:bg-accent-soft">Fill empty benches automatically</button>
                </div>
              ) : null}
            </Form>
          </section>
          {isInstructor ? (
            <>
              <section aria-labelledby="notify-h" className="mt-8 rounded border border-rule bg-white p-4">
                <h2 id="notify-h" className="mb-2 text-xl font-bold">Tell the groups</h2>
                <p className="mb-3">
                  {view.notifiedAt ? `Groups were e-mailed on ${view.notifiedAt.slice(0, 16).replace("T", " ")} UTC; every change since is in the audit log. ` : ""}
                  Each student of an assigned group gets an e-mail with the link to their bench sheet.
                </p>
                <Form method="post"><Button name="intent" value="notify" busy={busy}>{view.notifiedAt ? "E-mail the groups again" : "E-mail the groups"}</Button></Form>
              </section>
              <section aria-labelledby="details-h" className="mt-8 rounded border border-rule bg-white p-4">
                <h2 id="details-h" className="mb-2 text-xl font-bold">Change the practical's details</h2>
                <Form method="post" noValidate className="grid gap-x-4 sm:grid-cols-3">
                  <input type="hidden" name="intent" value="edit-details" />
                  {(() => {
                    const r = actionData?.details;
                    const f = (name: string, label: string, value: string, type = "text") => (
                      <Field label={label} name={name} type={type} defaultValue={typed(r, name) ?? value} error={fieldError(r, name)} />
                    );
                    return (
                      <>
                        {f("title", "Title", view.title)}
                        {f("date", "Lab day", view.date, "date")}
                        {f("deadline", `Upload deadline (${course.timeZone})`, view.deadline ? wallTime(new Date(view.deadline), course.timeZone) : "", "datetime-local")}
                        {f("slotMinutes", "Slot (min)", String(view.slotMinutes))}
                        {f("setupMinutes", "Set-up (min)", String(view.setupMinutes))}
                        {f("samplingIntervalS", "Sampling interval (s)", String(view.samplingIntervalS))}
                      </>
                    );
                  })()}
                  <div><Button name="intent" value="edit-details" busy={busy}>Save details</Button></div>
                </Form>
              </section>
              <section aria-labelledby="edit-h" className="mt-8">
                <h2 id="edit-h" className="mb-2 text-xl font-bold">Change a bench</h2>
                <div className="grid gap-3 md:grid-cols-2">
                  {view.benches.map((b) => (
                    <Form key={b.id} method="post" className="flex flex-wrap items-end gap-2 rounded border border-rule bg-white p-3" aria-label={`Change bench ${b.label}`}>
                      <input type="hidden" name="intent" value="edit-bench" />
                      <input type="hidden" name="benchId" value={b.id} />
                      <label className="text-sm">Label<input name="label" defaultValue={b.label} className="block w-14 rounded border border-ink-soft px-2 py-1" /></label>
                      <label className="text-sm">CA0 (mol/L)<input name="CA0" defaultValue={b.CA0} inputMode="decimal" className="block w-24 rounded border border-ink-soft px-2 py-1" /></label>
                      <label className="text-sm">CB0 (mol/L)<input name="CB0" defaultValue={b.CB0} inputMode="decimal" className="block w-24 rounded border border-ink-soft px-2 py-1" /></label>
                      <label className="text-sm">T (°C)<input name="temperatureC" defaultValue={b.temperatureC} inputMode="decimal" className="block w-20 rounded border border-ink-soft px-2 py-1" /></label>
                      <button type="submit" className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft">Save bench {b.label}</button>
                      {actionData?.benchId === b.id && actionData.tone === "error" ? <p role="alert" className="w-full text-sm font-bold text-bad">✕ {actionData.message}</p> : null}
                    </Form>
                  ))}
                </div>
              </section>
            </>
          ) : null}
        </>
      )}
    </>
  );
}
