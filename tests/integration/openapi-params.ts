// Values for the path parameters of the OpenAPI document, taken from the demo data. An area
// that adds a path with a new parameter adds its value here.
import { Course } from "~/.server/db/models.server";

export async function pathParameterValues(): Promise<Record<string, number | string>> {
  const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
  return { courseId: course!.id };
}
