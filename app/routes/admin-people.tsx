import { data, useFetcher } from "react-router";
import type { Route } from "./+types/admin-people";
import { requireUser } from "~/.server/guards.server";
import { changeUserRole } from "~/.server/people.server";
import { ROLES, User } from "~/.server/db/models.server";
import { PageTitle } from "~/components/page";

export const meta: Route.MetaFunction = () => [{ title: "People · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const me = await requireUser(request, { roles: ["admin"] });
  const users = await User.findAll({ order: [["displayName", "ASC"]], attributes: ["id", "email", "displayName", "role", "passwordHash", "createdAt"] });
  return {
    meId: me.id,
    roles: ROLES,
    users: users.map((u) => ({ id: u.id, email: u.email, name: u.displayName, role: u.role, active: !!u.passwordHash, since: u.createdAt.toISOString().slice(0, 10) })),
  };
}

export async function action({ request }: Route.ActionArgs) {
  const me = await requireUser(request, { roles: ["admin"] });
  const form = await request.formData();
  const result = await changeUserRole(me, Number(form.get("userId")), form.get("role"));
  if (!result.ok) return data({ error: result.errors.role ?? result.errors.form ?? "Not changed." }, { status: 400 });
  return { error: null };
}

function RoleCell({ userId, role, roles, name }: { userId: number; role: string; roles: readonly string[]; name: string }) {
  const fetcher = useFetcher<typeof action>();
  return (
    <fetcher.Form method="post" className="flex items-center gap-2">
      <input type="hidden" name="userId" value={userId} />
      <label className="sr-only" htmlFor={`urole-${userId}`}>Role of {name}</label>
      <select id={`urole-${userId}`} name="role" defaultValue={role} className="rounded border border-ink-soft bg-white px-2 py-1" onChange={(e) => fetcher.submit(e.currentTarget.form)}>
        {roles.map((r) => <option key={r} value={r}>{r}</option>)}
      </select>
      {fetcher.state !== "idle" ? <span className="text-sm text-ink-soft">saving…</span> : null}
      {fetcher.data?.error ? <span role="alert" className="text-sm font-bold text-bad">✕ {fetcher.data.error}</span> : null}
    </fetcher.Form>
  );
}

export default function AdminPeople({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageTitle sub="Everyone with a Ratebook account. Role changes are written to the audit log.">People</PageTitle>
      <table className="w-full border-collapse bg-white text-left">
        <thead>
          <tr className="border-b-2 border-ink">
            <th className="px-3 py-2">Name</th><th className="px-3 py-2">E-mail</th><th className="px-3 py-2">Role</th>
            <th className="px-3 py-2">Account</th><th className="px-3 py-2">Since</th>
          </tr>
        </thead>
        <tbody>
          {loaderData.users.map((u) => (
            <tr key={u.id} className="border-b border-rule">
              <td className="px-3 py-2">{u.name}{u.id === loaderData.meId ? " (you)" : ""}</td>
              <td className="px-3 py-2">{u.email}</td>
              <td className="px-3 py-2"><RoleCell userId={u.id} role={u.role} roles={loaderData.roles} name={u.name} /></td>
              <td className="px-3 py-2">{u.active ? "● active" : "◔ invited"}</td>
              <td className="px-3 py-2">{u.since}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </>
  );
}
