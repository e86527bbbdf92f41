// Groups of a course: create, rename, move a student, delete an empty group, or form groups of a
// chosen size from the students in none (instructors; demonstrators may look).
import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/groups";
import { requireCourseFromPath } from "~/.server/guards.server";
import { formId } from "~/.server/ids.server";
import { readForm } from "~/.server/body.server";
import { courseGroups, createGroup, deleteGroup, formGroups, moveStudent, renameGroup } from "~/.server/planning/groups.server";
import { Button, Field, FormMessage, SelectField } from "~/components/form";
import { GROUP_ORDERS, GROUP_ORDER_TEXT, newSeed } from "~/lib/planning/group-order";
import { PageTitle } from "~/components/page";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Groups · Ratebook" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseFromPath(request, params.courseId, ["instructor", "demonstrator"]);
  // a fresh seed is offered for a shuffle; the message after forming repeats the one used
  return { course: { id: course.id, code: course.code }, canEdit: role === "instructor", seed: newSeed(), ...(await courseGroups(course.id)) };
}

type ActionData = { intent: string; ok: boolean; field: string; message: string; groupId: number | null };

export async function action({ request, params }: Route.ActionArgs) {
  const { user, course } = await requireCourseFromPath(request, params.courseId, ["instructor"]);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const name = String(form.get("name") ?? "").trim();
  const groupId = formId(form, "groupId");
  let r: { ok: true; message: string } | { ok: false; field: string; message: string };
  if (intent === "create") r = await createGroup(user, course.id, name);
  else if (intent === "rename") r = groupId === null ? { ok: false, field: "form", message: "Which group?" } : await renameGroup(user, course.id, groupId, name);
  else if (intent === "delete") r = groupId === null ? { ok: false, field: "form", message: "Which group?" } : await deleteGroup(user, course.id, groupId);
  else if (intent === "move") {
    const userId = formId(form, "userId");
    const target = form.get("groupId") === "" ? null : groupId;
    r = userId === null ? { ok: false, field: "form", message: "Which student?" } : await moveStudent(user, course.id, userId, target);
  } else if (intent === "form") r = await formGroups(user, course.id, Number(form.get("size")), form.get("order") ?? "name", form.get("seed"));
  else r = { ok: false, field: "form", message: `Unknown action "${intent}".` };
  const body: ActionData = { intent, groupId, ok: r.ok, field: r.ok ? "" : r.field, message: r.message };
  return data(body, { status: r.ok ? 200 : 400 });
}

export default function Groups({ loaderData, actionData }: Route.ComponentProps) {
  const { course, groups, ungrouped, students, canEdit } = loaderData;
  const busy = useNavigation().state === "submitting";
  const err = (intent: string, field: string, gid: number | null = null) =>
    actionData && !actionData.ok && actionData.intent === intent && actionData.field === field && actionData.groupId === gid ? actionData.message : undefined;
  const groupOf = new Map(groups.flatMap((g) => g.members.map((m) => [m.userId, g.id] as const)));
  return (
    <>
      <PageTitle trail={trailFor("Groups", course)} sub={<>{groups.length} groups, {ungrouped.length} students in none</>}>Groups</PageTitle>
      {actionData?.ok ? <FormMessage tone="info">{actionData.message}</FormMessage> : null}
      {actionData && !actionData.ok && actionData.field === "form" ? <FormMessage tone="error">{actionData.message}</FormMessage> : null}
      {!groups.length && !students.length ? (
        <p className="mb-4">No students yet. <Link className="underline" to={`/courses/${course.id}/roster`}>Import a roster</Link> first.</p>
      ) : null}
      <div className="grid gap-8 lg:grid-cols-[2fr_1fr]">
        <section aria-labelledby="groups-h">
          <h2 id="groups-h" className="mb-3 text-xl font-bold">Groups</h2>
          <ul className="grid gap-3 sm:grid-cols-2">
            {groups.map((g) => (
              <li key={g.id} className="rounded border border-rule bg-white p-3">
                <h3 className="font-bold">{g.name} <span className="font-normal text-ink-soft">({g.members.length})</span></h3>
                <ul className="mb-2 text-sm">{g.members.map((m) => <li key={m.userId}>{m.name}</li>)}</ul>
                {canEdit ? (
                  <div className="flex flex-wrap items-end gap-2">
                    <Form method="post" className="flex items-end gap-2">
                      <input type="hidden" name="intent" value="rename" />
                      <input type="hidden" name="groupId" value={g.id} />
                      <label className="text-sm">New name<input name="name" defaultValue={g.name} className="block w-32 rounded border border-ink-soft px-2 py-1" aria-invalid={err("rename", "name", g.id) ? true : undefined} /></label>
                      <button type="submit" className="rounded border border-ink-soft px-2 py-1 text-sm">Rename</button>
                    </Form>
                    {g.members.length === 0 ? (
                      <Form method="post">
                        <input type="hidden" name="intent" value="delete" />
                        <input type="hidden" name="groupId" value={g.id} />
                        <button type="submit" className="rounded border border-bad px-2 py-1 text-sm text-bad">Delete empty group</button>
                      </Form>
                    ) : null}
                    {err("rename", "name", g.id) ? <p role="alert" className="w-full text-sm font-bold text-bad">✕ {err("rename", "name", g.id)}</p> : null}
                  </div>
                ) : null}
              </li>
            ))}
          </ul>
          {canEdit && students.length ? (
            <section aria-labelledby="move-h" className="mt-6">
              <h2 id="move-h" className="mb-2 text-xl font-bold">Move a student</h2>
              <Form method="post" className="flex flex-wrap items-end gap-3 rounded border border-rule bg-white p-3">
                <input type="hidden" name="intent" value="move" />
                <label className="text-sm font-bold">Student
                  <select name="userId" className="block rounded border border-ink-soft bg-white px-2 py-1 font-normal">
                    {students.map((s) => <option key={s.userId} value={s.userId}>{s.name}{groupOf.has(s.userId) ? "" : " (no group)"}</option>)}
                  </select>
                </label>
                <label className="text-sm font-bold">To group
                  <select name="groupId" className="block rounded border border-ink-soft bg-white px-2 py-1 font-normal">
                    {groups.map((g) => <option key={g.id} value={g.id}>{g.name}</option>)}
                    <option value="">— no group —</option>
                  </select>
                </label>
                <Button busy={busy}>Move</Button>
              </Form>
            </section>
          ) : null}
        </section>
        {canEdit ? (
          <div className="space-y-6 self-start">
            <section aria-labelledby="new-h" className="rounded border border-rule bg-white p-4">
              <h2 id="new-h" className="mb-3 text-xl font-bold">New group</h2>
              <Form method="post" noValidate>
                <input type="hidden" name="intent" value="create" />
                <Field label="Name" name="name" error={err("create", "name")} />
                <Button busy={busy}>Create group</Button>
              </Form>
            </section>
            <section aria-labelledby="auto-h" className="rounded border border-rule bg-white p-4">
              <h2 id="auto-h" className="mb-3 text-xl font-bold">Form groups automatically</h2>
              <p className="mb-2 text-sm">Puts the {ungrouped.length} student(s) in no group into new groups of this size, in the order you choose.</p>
              <Form method="post" noValidate>
                <input type="hidden" name="intent" value="form" />
                <Field label="Group size" name="size" inputMode="numeric" defaultValue="2" error={err("form", "size")} />
                <SelectField label="Order" name="order" options={[...GROUP_ORDERS]} labels={GROUP_ORDER_TEXT} defaultValue="name" error={err("form", "order")} />
                <Field label="Seed for a shuffle" name="seed" inputMode="numeric" defaultValue={String(loaderData.seed)} error={err("form", "seed")} hint="Used only when shuffled; the same seed forms the same groups again." />
                <Button busy={busy}>Form groups</Button>
              </Form>
            </section>
          </div>
        ) : null}
      </div>
    </>
  );
}
