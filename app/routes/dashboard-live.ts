// The dashboard's live figures as JSON, polled by the dashboard every few seconds while a
// practical is open for uploads (app/routes/dashboard.tsx). Course staff only.
import type { Route } from "./+types/dashboard-live";
import { isCourseStaffSomewhere, requireUser } from "~/.server/guards.server";
import { whileDatabaseUp } from "~/.server/db/unavailable.server";
import { liveFigures } from "~/.server/dashboard/live.server";

export async function loader({ request }: Route.LoaderArgs) {
  return whileDatabaseUp(true, async () => {
    const user = await requireUser(request, { api: true });
    if (!(await isCourseStaffSomewhere(user))) return Response.json({ error: "The live figures are for course staff (instructors and demonstrators)." }, { status: 403 });
    return Response.json(await liveFigures(user));
  });
}
