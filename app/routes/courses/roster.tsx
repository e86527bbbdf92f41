// Roster import: upload a CSV or .xlsx, see every row sorted into new / unchanged / updated /
// bad before anything is saved, then confirm to save it all in one transaction. Demonstrators
// are added by e-mail here too.
import { data, Form, Link, useNavigation } from "react-router";
import { parseFormData, MaxFileSizeExceededError, MaxFilesExceededError, type FileUpload } from "@remix-run/form-data-parser";
import type { Route } from "./+types/roster";
import { requireCourseFromPath } from "~/.server/guards.server";
import { readForm } from "~/.server/body.server";
import { ROSTER_MAX_BYTES, RosterFileError, importRoster, previewRoster, readTable, rosterRows, type PreviewRow, type RosterRow } from "~/.server/planning/roster.server";
import { inviteToCourse } from "~/.server/people.server";
import { Button, Field, FormMessage } from "~/components/form";
import { PageTitle, TableBox } from "~/components/page";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Roster · Ratebook" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseFromPath(request, params.courseId, ["instructor"]);
  return { course: { id: course.id, code: course.code, title: course.title }, maxBytes: ROSTER_MAX_BYTES };
}

type ActionData =
  | { kind: "preview"; fileName: string; rows: PreviewRow[]; payload: string }
  | { kind: "error"; message: string; rows?: PreviewRow[] }
  | { kind: "saved"; message: string }
  | { kind: "demonstrator"; ok: boolean; message: string; errors: Record<string, string | undefined>; email: string };

export async function action({ request, params }: Route.ActionArgs) {
  const { user, course } = await requireCourseFromPath(request, params.courseId, ["instructor"]);
  const type = request.headers.get("content-type") ?? "";
  if (type.startsWith("multipart/form-data")) {
    let upload: { name: string; bytes: Uint8Array } | null = null;
    try {
      await parseFormData(request, { maxFileSize: ROSTER_MAX_BYTES, maxFiles: 1 }, async (file: FileUpload) => {
        if (file.fieldName === "roster") upload = { name: file.name || "the file", bytes: new Uint8Array(await file.arrayBuffer()) };
      });
    } catch (error) {
      if (error instanceof MaxFileSizeExceededError) return data<ActionData>({ kind: "error", message: `The file is larger than ${ROSTER_MAX_BYTES / 1048576} MiB; a roster is a small table. Nothing was saved.` }, { status: 413 });
      if (error instanceof MaxFilesExceededError) return data<ActionData>({ kind: "error", message: "Upload one roster file at a time." }, { status: 400 });
      throw error;
    }
    const file = upload as { name: string; bytes: Uint8Array } | null;
    if (!file || file.bytes.length === 0) return data<ActionData>({ kind: "error", message: file ? `${file.name} is empty. Nothing was saved.` : "Choose a roster file (CSV or .xlsx) first." }, { status: 400 });
    try {
      const rows = rosterRows(file.name, await readTable(file.name, file.bytes));
      const preview = await previewRoster(course.id, rows);
      const payload = JSON.stringify(rows);
      return data<ActionData>({ kind: "preview", fileName: file.name, rows: preview, payload });
    } catch (error) {
      if (error instanceof RosterFileError) return data<ActionData>({ kind: "error", message: `${error.message} Nothing was saved.` }, { status: 400 });
      throw error;
    }
  }
  const form = await readForm(request, { limit: 4 * 1024 * 1024 });
  const intent = String(form.get("intent") ?? "");
  if (intent === "confirm") {
    let rows: RosterRow[];
    try {
      rows = JSON.parse(String(form.get("rows") ?? "")) as RosterRow[];
      if (!Array.isArray(rows) || !rows.length) throw new Error("empty");
    } catch {
      return data<ActionData>({ kind: "error", message: "The preview was lost; upload the file again." }, { status: 400 });
    }
    const r = await importRoster(user, course.id, rows.map((x) => ({ row: Number(x.row), studentNumber: String(x.studentNumber ?? ""), name: String(x.name ?? ""), email: String(x.email ?? ""), group: String(x.group ?? "") })));
    if (!r.ok) return data<ActionData>({ kind: "error", message: `${r.message} Nothing was saved.`, rows: r.preview }, { status: 400 });
    const s = r.value;
    return data<ActionData>({ kind: "saved", message: `Saved: ${s.added} added, ${s.updated} updated, ${s.unchanged} unchanged; ${s.groupsCreated} new group(s); ${s.invited} invitation(s) queued${s.invitedExisting ? `; ${s.invitedExisting} person(s) with an account invited to join (they keep their names and join when they accept)` : ""}.` });
  }
  if (intent === "add-demonstrator") {
    const email = String(form.get("email") ?? "");
    const r = await inviteToCourse(user, course.id, { email, displayName: form.get("displayName"), role: "demonstrator" });
    if (!r.ok) return data<ActionData>({ kind: "demonstrator", ok: false, message: "", errors: r.errors, email }, { status: 400 });
    return data<ActionData>({ kind: "demonstrator", ok: true, message: r.value.invited ? `Invitation sent to ${email}.` : `${email} is now a demonstrator in this course.`, errors: {}, email: "" });
  }
  return data<ActionData>({ kind: "error", message: `Unknown action "${intent}".` }, { status: 400 });
}

const STATUS_TEXT: Record<PreviewRow["status"], string> = { new: "＋ new", unchanged: "= unchanged", updated: "↻ updated", bad: "✕ problem" };

function PreviewTable({ rows }: { rows: PreviewRow[] }) {
  return (
    <TableBox label="Roster rows">
      <table className="w-full border-collapse text-left text-sm">
        <thead>
          <tr className="border-b-2 border-ink"><th className="px-2 py-2">Row</th><th className="px-2 py-2">Status</th><th className="px-2 py-2">Student ID</th><th className="px-2 py-2">Name</th><th className="px-2 py-2">E-mail</th><th className="px-2 py-2">Group</th><th className="px-2 py-2">Notes</th></tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.row} className={`border-b border-rule ${r.status === "bad" ? "bg-bad-soft" : ""}`}>
              <td className="num px-2 py-1">{r.row}</td>
              <td className={`px-2 py-1 font-bold ${r.status === "bad" ? "text-bad" : ""}`}>{STATUS_TEXT[r.status]}</td>
              <td className="px-2 py-1">{r.studentNumber}</td>
              <td className="px-2 py-1">{r.name}</td>
              <td className="px-2 py-1">{r.email}</td>
              <td className="px-2 py-1">{r.group}</td>
              <td className="px-2 py-1">{r.notes.join("; ")}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </TableBox>
  );
}

export default function Roster({ loaderData, actionData }: Route.ComponentProps) {
  const { course, maxBytes } = loaderData;
  const busy = useNavigation().state === "submitting";
  const preview = actionData?.kind === "preview" ? actionData : null;
  const counts = preview ? Object.fromEntries((["new", "unchanged", "updated", "bad"] as const).map((s) => [s, preview.rows.filter((r) => r.status === s).length])) : null;
  const demo = actionData?.kind === "demonstrator" ? actionData : null;
  return (
    <>
      <PageTitle trail={trailFor("Roster", course)} sub={<>students from a CSV or .xlsx file</>}>Roster</PageTitle>
      {actionData?.kind === "error" ? <FormMessage tone="error">{actionData.message}</FormMessage> : null}
      {actionData?.kind === "saved" ? <FormMessage tone="info">{actionData.message} <Link className="underline" to={`/courses/${course.id}/groups`}>See the groups</Link>.</FormMessage> : null}
      {actionData?.kind === "error" && actionData.rows ? <PreviewTable rows={actionData.rows} /> : null}
      <div className="grid gap-8 lg:grid-cols-[2fr_1fr]">
        <section aria-labelledby="upload-h" className="min-w-0">
          <h2 id="upload-h" className="mb-2 text-xl font-bold">Upload a roster</h2>
          <p className="mb-3 text-sm">A header row with the columns <strong>student ID</strong>, <strong>name</strong>, <strong>e-mail</strong> and, if you like, <strong>group</strong>; then one student a row. At most {maxBytes / 1048576} MiB. Nothing is saved until you confirm the preview.</p>
          <Form method="post" encType="multipart/form-data" className="mb-6 flex flex-wrap items-end gap-3 rounded border border-rule bg-white p-4">
            <div className="min-w-0 max-w-full">
              <label htmlFor="roster" className="block font-bold">Roster file</label>
              <input id="roster" name="roster" type="file" accept=".csv,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet" className="mt-1 block w-full max-w-full text-sm" />
            </div>
            <Button busy={busy}>Preview</Button>
          </Form>
          {preview && counts ? (
            <section aria-labelledby="preview-h">
              <h3 id="preview-h" className="mb-2 text-lg font-bold">Preview of {preview.fileName}: {counts.new} new, {counts.updated} updated, {counts.unchanged} unchanged, {counts.bad} with problems</h3>
              <PreviewTable rows={preview.rows} />
              {counts.bad ? (
                <FormMessage tone="error">Fix the rows marked “problem” in the file and upload it again; nothing is saved while any row has a problem.</FormMessage>
              ) : (
                <Form method="post" className="mt-3">
                  <input type="hidden" name="intent" value="confirm" />
                  <input type="hidden" name="rows" value={preview.payload} />
                  <Button busy={busy}>Save {counts.new + counts.updated} change(s)</Button>
                </Form>
              )}
            </section>
          ) : null}
        </section>
        <section aria-labelledby="demo-h" className="self-start rounded border border-rule bg-white p-4">
          <h2 id="demo-h" className="mb-3 text-xl font-bold">Add a demonstrator</h2>
          {demo?.ok ? <FormMessage tone="info">{demo.message}</FormMessage> : null}
          <Form method="post" noValidate>
            <input type="hidden" name="intent" value="add-demonstrator" />
            <Field label="E-mail" name="email" type="email" defaultValue={demo && !demo.ok ? demo.email : ""} error={demo?.errors.email} />
            <Field label="Name" name="displayName" error={demo?.errors.displayName} />
            <Button busy={busy}>Add demonstrator</Button>
          </Form>
        </section>
      </div>
    </>
  );
}
