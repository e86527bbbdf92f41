// One place that decides who may see what. Pages get a redirect to sign-in (with a return
// address) or a 403 page; API routes get 401/403 JSON.
import { data, redirect } from "react-router";
import { getSession } from "./session.server";
import { CourseMembership, User, type CourseRole, type Role } from "./db/models.server";

interface GuardOptions {
  roles?: readonly Role[];
  api?: boolean;
}

function deny(status: 401 | 403, message: string, api: boolean): never {
  if (api) throw Response.json({ error: message }, { status });
  throw data({ message }, { status });
}

// The layout's loader and the page's loader get the same Request: look the person up once.
const usersByRequest = new WeakMap<Request, Promise<User | null>>();

export function currentUser(request: Request): Promise<User | null> {
  let user = usersByRequest.get(request);
  if (!user) {
    user = lookUpUser(request);
    usersByRequest.set(request, user);
  }
  return user;
}

async function lookUpUser(request: Request): Promise<User | null> {
  const session = await getSession(request);
  const userId = session.get("userId");
  if (!userId) return null;
  // Read on every request, so a changed role or a removed account takes effect at once.
  return User.findByPk(userId);
}

export async function requireUser(request: Request, options: GuardOptions = {}): Promise<User> {
  const api = options.api ?? false;
  const user = await currentUser(request);
  if (!user) {
    if (api) deny(401, "Sign in first.", true);
    const url = new URL(request.url);
    throw redirect(`/sign-in?returnTo=${encodeURIComponent(url.pathname + url.search)}`);
  }
  if (options.roles && !options.roles.includes(user.role)) {
    deny(403, `This needs the role ${options.roles.join(" or ")}; you are signed in as ${user.role}.`, api);
  }
  return user;
}

/** The caller's role in a course (admins act as instructors everywhere), or a 403/404. */
export async function requireCourseRole(
  user: User,
  courseId: number,
  roles: readonly CourseRole[],
  api = false,
): Promise<CourseRole> {
  if (user.role === "admin") return "instructor";
  const membership = Number.isInteger(courseId)
    ? await CourseMembership.findOne({ where: { courseId, userId: user.id } })
    : null;
  if (!membership) deny(403, "You are not a member of this course.", api);
  if (!roles.includes(membership.role)) {
    deny(403, `This needs the course role ${roles.join(" or ")}; yours is ${membership.role}.`, api);
  }
  return membership.role;
}

/** Only relative paths inside the app, so a crafted link cannot send people elsewhere. */
export function safeReturnTo(raw: unknown, fallback = "/dashboard") {
  const value = typeof raw === "string" ? raw : "";
  return value.startsWith("/") && !value.startsWith("//") && !value.startsWith("/\\") ? value : fallback;
}
