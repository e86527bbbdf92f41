// Loading a submission for whoever asks, with the access rules of shared/api.md: staff of its
// course, or a member of its group; anyone else gets 404 (a student must not learn that another
// group's submission exists) or 403 when they are not in the course at all.
import { data } from "react-router";
import type { User } from "../db/models.server";
import { Group } from "../db/groups.server";
import { Submission } from "../db/submissions.server";
import { viewerOfGroup, type Viewer } from "./context.server";

export async function loadSubmission(user: User, submissionId: number, api: boolean): Promise<{ submission: Submission; group: Group; viewer: Viewer }> {
  const submission = await Submission.findByPk(submissionId);
  const group = submission ? await Group.findByPk(submission.groupId) : null;
  if (!submission || !group) {
    if (api) throw Response.json({ error: "There is no such submission." }, { status: 404 });
    throw data({ message: "There is no such submission." }, { status: 404 });
  }
  const viewer = await viewerOfGroup(user, group, api);
  return { submission, group, viewer };
}
