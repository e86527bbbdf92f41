// GET /sessions/:sessionId/benches.xlsx: the bench assignment (bench, group, members, feed, temperature, stock volumes) for the prep room. Staff only.
import type { Route } from "./+types/benches-xlsx";
import { benchAssignmentDownload } from "~/.server/exports/bench-assignment.server";

export function loader({ request, params }: Route.LoaderArgs) {
  return benchAssignmentDownload(request, params.sessionId, "xlsx");
}
