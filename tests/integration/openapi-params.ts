// Values for the path parameters (and "{name}" placeholders in example bodies) of the OpenAPI
// document, taken from the demo data. An area that adds a path with a new parameter adds it here.
import { Course, User } from "~/.server/db/models.server";
import { createApiToken } from "~/.server/api-tokens.server";
import { LabSession } from "~/.server/db/lab-sessions.server";
import { ReactionSystem } from "~/.server/db/reaction-systems.server";
import { submissionFixture } from "../access/submission-fixture";

export async function pathParameterValues(): Promise<Record<string, number | string>> {
  const course = await Course.findOne({ where: { code: "KIN-DEMO" } });
  // A token of the test's caller (the instructor), for DELETE /api/tokens/{tokenId}.
  const instructor = await User.findOne({ where: { email: "instructor@demo.ratebook.invalid" } });
  const token = await createApiToken(instructor!, "OpenAPI test token", 1);
  const session = await LabSession.findOne({ where: { courseId: course!.id }, order: [["id", "ASC"]] });
  const reaction = await ReactionSystem.findOne({ where: { courseId: course!.id }, order: [["id", "ASC"]] });
  const { groupId, submissionId } = await submissionFixture();
  return { tableKey: "session-gradebook", courseId: course!.id, tokenId: token.id, sessionId: session!.id, reactionSystemId: reaction!.id, groupId, submissionId };
}
