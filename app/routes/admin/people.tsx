import { data } from "react-router";
import type { Route } from "./+types/people";
import { requireUser } from "~/.server/guards.server";
import { changeUserRole, type FieldErrors } from "~/.server/people.server";
import { ROLES, User } from "~/.server/db/models.server";
import { PageTitle } from "~/components/page";
import { RoleSelect } from "~/components/role-select";
import { readForm } from "~/.server/body.server";
import { formId } from "~/.server/ids.server";

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
  const form = await readForm(request);
  const userId = formId(form, "userId");
  if (userId === null) return data({ errors: { form: "That row does not name a person; reload the page." } as FieldErrors }, { status: 400 });
  const result = await changeUserRole(me, userId, form.get("role"));
  const errors: FieldErrors = result.ok ? {} : result.errors;
  return data({ errors }, { status: result.ok ? 200 : 400 });
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
              <td className="px-3 py-2"><RoleSelect id={`urole-${u.id}`} label={`Role of ${u.name}`} role={u.role} roles={loaderData.roles} fields={{ userId: u.id }} /></td>
              <td className="px-3 py-2">{u.active ? "● active" : "◔ invited"}</td>
              <td className="px-3 py-2">{u.since}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </>
  );
}
