// The JSON face of the designer checks (POST /api/feed-check), shared by the page's live
// re-check and the API.
import { z } from "zod";
import type { User } from "../db/models.server";
import { requireCourseRole } from "../guards.server";
import { ReactionSystem } from "../db/reaction-systems.server";
import { benchProblems, predictBench, sessionProblems } from "~/lib/planning/feed-design";
import { reactionForDesign } from "./sessions.server";

const finite = z.number().refine(Number.isFinite);
const requestSchema = z.object({
  reactionSystemId: z.number().int().positive(),
  session: z.object({
    slotMinutes: finite,
    setupMinutes: finite,
    samplingIntervalS: finite,
    reactorVolumeMl: finite,
    stockAMolL: finite,
    stockBMolL: finite,
    targetConversion: finite,
  }),
  benches: z.array(z.object({ label: z.string().max(20), CA0: finite, CB0: finite, temperatureC: finite })).min(1).max(40),
});

export async function checkFeedRequest(user: User, body: unknown): Promise<{ status: number; body: unknown }> {
  const parsed = requestSchema.safeParse(body);
  if (!parsed.success) {
    return { status: 400, body: { errors: parsed.error.issues.map((i) => ({ path: i.path.join("."), message: i.message })) } };
  }
  const { reactionSystemId, session, benches } = parsed.data;
  const rs = await ReactionSystem.findByPk(reactionSystemId);
  if (!rs) return { status: 404, body: { error: "There is no reaction system with this id." } };
  // a check that stores nothing: allowed on an archived course's reaction systems
  await requireCourseRole(user, rs.courseId, ["instructor", "demonstrator"], true, { whileArchived: true });
  const problems = [...sessionProblems(session, "session"), ...benchProblems(benches)];
  const reaction = reactionForDesign(rs);
  const predictions = problems.length
    ? benches.map(() => null)
    : benches.map((b) => {
        const p = predictBench(reaction, session, b);
        return { ...p, minutesToTarget: Number.isFinite(p.minutesToTarget) ? p.minutesToTarget : null };
      });
  return { status: 200, body: { problems, benches: predictions } };
}
