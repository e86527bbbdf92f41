// GET /courses/:courseId/export.csv: a course's marks sheet as CSV (UTF-8 with a byte-order mark). Staff only; a Bearer token works too.
import type { Route } from "./+types/export-csv";
import { exportDownload } from "~/.server/exports/gradebook-export.server";

export function loader({ request, params }: Route.LoaderArgs) {
  return exportDownload(request, "course", params.courseId, "csv");
}
