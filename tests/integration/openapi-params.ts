// Values for the path parameters of the OpenAPI document, taken from the demo data. An area
// that adds a path with a new parameter adds its value here.
import { Course, User } from "~/.server/db/models.server";
import { createApiToken } from "~/.server/api-tokens.server";

export async function pathParameterValues(): Promise<Record<string, number | string>> {
  const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
  // A token of the test's caller (the instructor), for DELETE /api/tokens/{tokenId}.
  const instructor = await User.findOne({ where: { email: "instructor@demo.ratebook.invalid" } });
  const token = await createApiToken(instructor!, "OpenAPI test token", 1);
  return { courseId: course!.id, tokenId: token.id };
}
