// GET /courses/:courseId/export.xlsx: a course's workbook (marks, each practical's fits, each group's readings). Staff only; a Bearer token works too.
import type { Route } from "./+types/export-xlsx";
import { exportDownload } from "~/.server/exports/gradebook-export.server";

export function loader({ request, params }: Route.LoaderArgs) {
  return exportDownload(request, "course", params.courseId, "xlsx");
}
