// One place that decides who may see what. Pages get a redirect to sign-in (with a return
// address) or a 403 page; API routes get 401/403 JSON.
import { data, redirect } from "react-router";
import { sessionOf } from "./session.server";
import { acceptsBearer, bearerTokenOf, personOfToken } from "./api-tokens.server";
import { Course, CourseMembership, User, ROLE_LABELS, type CourseRole, type Role } from "./db/models.server";
import { pathId } from "./ids.server";

interface GuardOptions {
  roles?: readonly Role[];
  api?: boolean;
}

function deny(status: 401 | 403, message: string, api: boolean): never {
  if (api) throw Response.json({ error: message }, { status });
  throw data({ message }, { status });
}

/**
 * Who is asking. Each credential kind looks at the request and either recognises it or answers
 * null; the first that recognises it wins. Add a kind (for example `Authorization: Bearer`
 * personal tokens) as one more entry of CREDENTIALS.
 */
export interface Principal {
  user: User;
  /** how the request proved who it is */
  via: "session" | (string & {});
  /** the user_sessions row, when signed in through the session cookie */
  sessionId?: number;
  /** the api_tokens row, when the request came with `Authorization: Bearer` */
  tokenId?: number;
}
type Credential = (request: Request) => Promise<Principal | null>;

const sessionCredential: Credential = async (request) => {
  const found = await sessionOf(request);
  return found ? { user: found.user, via: "session", sessionId: found.session.id } : null;
};

// A Bearer token on an API path or download; a bad one is refused at once (never falls back to the cookie).
const bearerCredential: Credential = async (request) => {
  const token = bearerTokenOf(request);
  if (token === undefined || !acceptsBearer(new URL(request.url).pathname)) return null;
  const found = await personOfToken(token);
  if (!found.ok) {
    throw Response.json({ error: found.message }, { status: 401, headers: { "WWW-Authenticate": 'Bearer error="invalid_token"' } });
  }
  return { user: found.user, via: "token", tokenId: found.tokenId };
};

const CREDENTIALS: Credential[] = [bearerCredential, sessionCredential];

// Who is changing something in this request: the person is looked up per request (a fresh User
// instance each time), so the policy below can tell a write from a read without every route
// saying so.
const READING_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);
const writers = new WeakSet<User>();

/** Whether this person's request is a write (any method but GET, HEAD, OPTIONS). */
export function isWriting(user: User): boolean {
  return writers.has(user);
}

export const ARCHIVED_READ_ONLY = "This course is archived, so it is read-only: nothing was changed. An instructor can take it out of the archive on the course page.";

/**
 * Archived means read-only everywhere: the one check, called by every policy function that
 * resolves a course (requireCourseRole, the group and practical checks of submissions). A read
 * passes; a write to an archived course is 409 with the reason. `whileArchived` is for the one
 * write an archived course takes: taking it out of the archive.
 */
export async function refuseWriteIfArchived(user: User, courseId: number, api: boolean, options: { whileArchived?: boolean } = {}): Promise<void> {
  if (options.whileArchived || !isWriting(user) || !Number.isInteger(courseId)) return;
  const course = await Course.findByPk(courseId, { attributes: ["id", "archivedAt"] });
  if (!course?.archivedAt) return;
  if (api) throw Response.json({ error: ARCHIVED_READ_ONLY }, { status: 409 });
  throw data({ message: ARCHIVED_READ_ONLY }, { status: 409 });
}

// The layout's loader and the page's loader get the same Request: look the person up once.
const principalsByRequest = new WeakMap<Request, Promise<Principal | null>>();

export function currentPrincipal(request: Request): Promise<Principal | null> {
  let principal = principalsByRequest.get(request);
  if (!principal) {
    principal = (async () => {
      // Read on every request, so an ended session, a changed role or a removed account takes effect at once.
      for (const credential of CREDENTIALS) {
        const found = await credential(request);
        if (found) {
          if (!READING_METHODS.has(request.method.toUpperCase())) writers.add(found.user);
          return found;
        }
      }
      return null;
    })();
    principalsByRequest.set(request, principal);
  }
  return principal;
}

export async function currentUser(request: Request): Promise<User | null> {
  return (await currentPrincipal(request))?.user ?? null;
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
    const names = options.roles.map((r) => ROLE_LABELS[r]).join(" or ");
    deny(403, `This needs an account of type ${names}; yours is ${ROLE_LABELS[user.role]}.`, api);
  }
  return user;
}

const STAFF_COURSE_ROLES: readonly CourseRole[] = ["instructor", "demonstrator"];

/**
 * Whether the person helps run some course: an instructor or demonstrator in a course that is
 * not archived, whatever their account role (admins and course creators count too). Work that
 * is not tied to one course (the data-set check) follows this, not the account role.
 */
export async function isCourseStaffSomewhere(user: User): Promise<boolean> {
  if (user.role === "admin" || user.role === "course-creator") return true;
  const n = await CourseMembership.count({
    where: { userId: user.id, role: STAFF_COURSE_ROLES as CourseRole[] },
    include: [{ model: Course, as: "course", where: { archivedAt: null }, required: true }],
  });
  return n > 0;
}

/** A signed-in person who is an instructor or demonstrator in some course (or an admin / course creator). */
export async function requireCourseStaff(request: Request, options: { api?: boolean } = {}): Promise<User> {
  const user = await requireUser(request, options);
  if (!(await isCourseStaffSomewhere(user))) {
    deny(403, "This needs the instructor or demonstrator role in at least one course.", options.api ?? false);
  }
  return user;
}

/** The caller's own role in a course, or null when not a member (for display; admins may still act). */
export async function ownCourseRole(user: User, courseId: number): Promise<CourseRole | null> {
  const m = await CourseMembership.findOne({ where: { courseId, userId: user.id } });
  return m?.role ?? null;
}

/** The caller's role in a course (admins act as instructors everywhere), or a 403/404. */
export async function requireCourseRole(
  user: User,
  courseId: number,
  roles: readonly CourseRole[],
  api = false,
  options: { whileArchived?: boolean } = {},
): Promise<CourseRole> {
  if (user.role === "admin") {
    await refuseWriteIfArchived(user, courseId, api, options);
    return "instructor";
  }
  const membership = Number.isInteger(courseId)
    ? await CourseMembership.findOne({ where: { courseId, userId: user.id } })
    : null;
  if (!membership) deny(403, "You are not a member of this course.", api);
  if (!roles.includes(membership.role)) {
    deny(403, `This needs the course role ${roles.join(" or ")}; yours is ${membership.role}.`, api);
  }
  await refuseWriteIfArchived(user, courseId, api, options);
  return membership.role;
}

export const NO_COURSE = "There is no course at this address.";

/**
 * A course page's check in one step: the signed-in person, the course from the path (404 when
 * there is none) and their role in it (403 unless one of `roles`; admins act as instructors).
 */
export async function requireCourseFromPath(request: Request, rawCourseId: string | undefined, roles: readonly CourseRole[], options: { whileArchived?: boolean } = {}) {
  const user = await requireUser(request);
  const course = await Course.findByPk(pathId(rawCourseId, NO_COURSE));
  if (!course) throw data({ message: NO_COURSE }, { status: 404 });
  const role = await requireCourseRole(user, course.id, roles, false, options);
  return { user, course, role };
}

/** Only paths inside the app, so a crafted link cannot send people elsewhere (app/lib/return-to.ts). */
export { safeReturnTo } from "~/lib/return-to";
