// GET /sessions/:sessionId/benches.csv: the bench assignment as CSV (UTF-8 with a byte-order mark). Staff only.
import type { Route } from "./+types/benches-csv";
import { benchAssignmentDownload } from "~/.server/exports/bench-assignment.server";

export function loader({ request, params }: Route.LoaderArgs) {
  return benchAssignmentDownload(request, params.sessionId, "csv");
}
