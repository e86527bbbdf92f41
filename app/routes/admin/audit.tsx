import type { Route } from "./+types/audit";
import { requireUser } from "~/.server/guards.server";
import { AuditEntry, User } from "~/.server/db/models.server";
import { PageTitle, TableBox } from "~/components/page";
import { auditChanges } from "~/lib/audit-text";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Audit log · Ratebook" }];
const PAGE = 200;

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, { roles: ["admin"] });
  const rows = await AuditEntry.findAll({
    order: [["createdAt", "DESC"], ["id", "DESC"]],
    limit: PAGE,
    include: [{ model: User, as: "actor", attributes: ["displayName", "email"] }],
  });
  return {
    rows: rows.map((r) => ({
      id: String(r.id),
      at: r.createdAt.toISOString().replace("T", " ").slice(0, 19),
      actor: r.actor ? `${r.actor.displayName} <${r.actor.email}>` : "system",
      action: r.action,
      entity: `${r.entityType}${r.entityId ? ` #${r.entityId}` : ""}`,
      changes: auditChanges(r.before, r.after),
    })),
  };
}

export default function AdminAudit({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageTitle trail={trailFor("Audit log")} sub={`Who changed what, and when: the latest ${PAGE} entries, newest first (times in UTC).`}>Audit log</PageTitle>
      <TableBox label="Audit log">
        <table className="w-full border-collapse text-left text-sm">
          <thead>
            <tr className="border-b-2 border-ink">
              <th className="px-2 py-2">When</th><th className="px-2 py-2">Who</th><th className="px-2 py-2">What</th>
              <th className="px-2 py-2">Record</th><th className="px-2 py-2">Change</th>
            </tr>
          </thead>
          <tbody>
            {loaderData.rows.map((r) => (
              <tr key={r.id} className="border-b border-rule align-top">
                <td className="px-2 py-1 whitespace-nowrap tabular-nums">{r.at}</td>
                <td className="px-2 py-1">{r.actor}</td>
                <td className="px-2 py-1 whitespace-nowrap">{r.action}</td>
                <td className="px-2 py-1 whitespace-nowrap">{r.entity}</td>
                <td className="px-2 py-1">
                  {r.changes.length ? <ul>{r.changes.map((c, i) => <li key={i}>{c}</li>)}</ul> : <span className="text-ink-soft">—</span>}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </TableBox>
    </>
  );
}
