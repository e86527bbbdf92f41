// GET /sessions/:sessionId/export.csv: a practical's marks sheet as CSV (UTF-8 with a byte-order mark). Staff only; a Bearer token works too.
import type { Route } from "./+types/export-csv";
import { exportDownload } from "~/.server/exports/gradebook-export.server";

export function loader({ request, params }: Route.LoaderArgs) {
  return exportDownload(request, "session", params.sessionId, "csv");
}
