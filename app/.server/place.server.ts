// The course and practical a page sits in, for its breadcrumb (see app/lib/place.ts). Called
// after the page's own access check, so it reads only codes and titles.
import { Course } from "./db/models.server";
import { LabSession } from "./db/lab-sessions.server";
import type { CoursePlace, PracticalPlace } from "~/lib/place";

export interface Place {
  course: CoursePlace | null;
  practical: PracticalPlace | null;
}

export async function practicalPlace(sessionId: number): Promise<Place> {
  const session = await LabSession.findByPk(sessionId, { attributes: ["id", "title", "courseId"] });
  if (!session) return { course: null, practical: null };
  const course = await Course.findByPk(session.courseId, { attributes: ["id", "code", "timeZone"] });
  return { course: course ? { id: course.id, code: course.code, timeZone: course.timeZone } : null, practical: { id: session.id, title: session.title } };
}

export async function coursePlace(courseId: number): Promise<Place> {
  const course = await Course.findByPk(courseId, { attributes: ["id", "code", "timeZone"] });
  return { course: course ? { id: course.id, code: course.code, timeZone: course.timeZone } : null, practical: null };
}
