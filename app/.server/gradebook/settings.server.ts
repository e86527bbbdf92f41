// How a course total is made: each practical's weight and whether missing work counts as zero.
// Instructors change it; every change is audited with the values before and after.
import { getSequelize } from "../db/sequelize.server";
import { Course, type User } from "../db/models.server";
import { LabSession } from "../db/lab-sessions.server";
import { recordAudit } from "../audit.server";

export interface GradeSettings {
  missingCountsAsZero: boolean;
  /** practical id -> weight (0-1000) */
  weights: Record<number, number>;
}

export class GradeSettingsProblem extends Error {
  constructor(public field: string, message: string) {
    super(message);
  }
}

export async function saveGradeSettings(actor: User, courseId: number, settings: GradeSettings): Promise<void> {
  for (const [id, w] of Object.entries(settings.weights)) {
    if (!Number.isFinite(w) || w < 0 || w > 1000) throw new GradeSettingsProblem(`weight-${id}`, "A weight is a number from 0 to 1000.");
  }
  await getSequelize().transaction(async (transaction) => {
    const course = await Course.findByPk(courseId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!course) throw new GradeSettingsProblem("course", "There is no such course.");
    const sessions = await LabSession.findAll({ where: { courseId }, transaction });
    const known = new Map(sessions.map((s) => [s.id, s]));
    const before: GradeSettings = { missingCountsAsZero: course.missingCountsAsZero, weights: {} };
    const after: GradeSettings = { missingCountsAsZero: settings.missingCountsAsZero, weights: {} };
    for (const [rawId, w] of Object.entries(settings.weights)) {
      const s = known.get(Number(rawId));
      if (!s) throw new GradeSettingsProblem(`weight-${rawId}`, "That practical is not in this course.");
      if (s.gradeWeight === w) continue;
      before.weights[s.id] = s.gradeWeight;
      after.weights[s.id] = w;
      s.gradeWeight = w;
      await s.save({ transaction });
    }
    const zeroChanged = course.missingCountsAsZero !== settings.missingCountsAsZero;
    if (zeroChanged) {
      course.missingCountsAsZero = settings.missingCountsAsZero;
      await course.save({ transaction });
    }
    if (zeroChanged || Object.keys(after.weights).length) {
      await recordAudit({ actorId: actor.id, action: "gradebook.settings", entityType: "course", entityId: courseId, before, after }, transaction);
    }
  });
}
