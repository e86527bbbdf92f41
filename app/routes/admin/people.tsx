import { data, Form } from "react-router";
import type { Route } from "./+types/people";
import { requireUser } from "~/.server/guards.server";
import { changeUserRole, removeAccount, type FieldErrors } from "~/.server/people.server";
import { ROLES, ROLE_LABELS, User } from "~/.server/db/models.server";
import { readForm } from "~/.server/body.server";
import { formId } from "~/.server/ids.server";
import { FormMessage } from "~/components/form";
import { PageTitle, TableBox } from "~/components/page";
import { RoleSelect } from "~/components/role-select";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "People · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const me = await requireUser(request, { roles: ["admin"] });
  const users = await User.findAll({ order: [["displayName", "ASC"]], attributes: ["id", "email", "displayName", "role", "passwordHash", "createdAt"] });
  return {
    meId: me.id,
    roles: ROLES,
    labels: ROLE_LABELS,
    users: users.map((u) => ({ id: u.id, email: u.email, name: u.displayName, role: u.role, active: !!u.passwordHash, since: u.createdAt.toISOString().slice(0, 10) })),
  };
}

export async function action({ request }: Route.ActionArgs) {
  const me = await requireUser(request, { roles: ["admin"] });
  const form = await readForm(request);
  const userId = formId(form, "userId");
  if (userId === null) return data({ errors: { form: "That row does not name a person; reload the page." } as FieldErrors, notice: null }, { status: 400 });
  if (form.get("intent") === "remove-account") {
    const result = await removeAccount(me, userId);
    return data({ errors: result.ok ? {} : result.errors, notice: result.ok ? "The account is removed, and every session it had is ended." : null }, { status: result.ok ? 200 : 400 });
  }
  const result = await changeUserRole(me, userId, form.get("role"));
  const errors: FieldErrors = result.ok ? {} : result.errors;
  return data({ errors, notice: null }, { status: result.ok ? 200 : 400 });
}

export default function AdminPeople({ loaderData, actionData }: Route.ComponentProps) {
  return (
    <>
      <PageTitle trail={trailFor("People")} sub="Everyone with a Ratebook account. The account type says what a person may do outside a course (inside a course, their course role decides). Changes are written to the audit log; taking an account type away signs the person out.">
        People
      </PageTitle>
      {actionData?.notice ? <FormMessage tone="info">{actionData.notice}</FormMessage> : null}
      <TableBox label="People">
        <table className="w-full border-collapse text-left">
          <thead>
            <tr className="border-b-2 border-ink">
              <th className="px-3 py-2">Name</th><th className="px-3 py-2">E-mail</th><th className="px-3 py-2">Account type</th>
              <th className="px-3 py-2">Account</th><th className="px-3 py-2">Since</th><th className="px-3 py-2"><span className="sr-only">Remove</span></th>
            </tr>
          </thead>
          <tbody>
            {loaderData.users.map((u) => (
              <tr key={u.id} className="border-b border-rule align-top">
                <td className="px-3 py-2">{u.name}{u.id === loaderData.meId ? " (you)" : ""}</td>
                <td className="px-3 py-2 whitespace-nowrap">{u.email}</td>
                <td className="px-3 py-2"><RoleSelect id={`urole-${u.id}`} label={`Account type of ${u.name}`} role={u.role} roles={loaderData.roles} labels={loaderData.labels} fields={{ userId: u.id }} /></td>
                <td className="px-3 py-2 whitespace-nowrap">{u.active ? "● active" : "◔ invited"}</td>
                <td className="px-3 py-2 whitespace-nowrap tabular-nums">{u.since}</td>
                <td className="px-3 py-2">
                  {u.id === loaderData.meId ? null : (
                    <Form method="post">
                      <input type="hidden" name="intent" value="remove-account" />
                      <input type="hidden" name="userId" value={u.id} />
                      <button type="submit" aria-label={`Remove the account of ${u.name}`} className="rounded border border-ink-soft px-2 py-1 text-sm whitespace-nowrap hover:bg-bad-soft">Remove</button>
                    </Form>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </TableBox>
    </>
  );
}
