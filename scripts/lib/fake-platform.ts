// A local fake learning platform for the demo and the tests: it starts LTI 1.3 launches of
// invented courses and people (login initiation, then a signed ID token posted back to the tool),
// publishes its key set, and can sign any claims the tests ask for, with its own key or another.
// Signing and the key set are jose's (a standard JOSE library); nothing here is used in production.
import http from "node:http";
import crypto from "node:crypto";
import { exportJWK, generateKeyPair, SignJWT, type CryptoKey, type JWK, type JWTPayload } from "jose";

export const LTI = {
  messageType: "https://purl.imsglobal.org/spec/lti/claim/message_type",
  version: "https://purl.imsglobal.org/spec/lti/claim/version",
  deploymentId: "https://purl.imsglobal.org/spec/lti/claim/deployment_id",
  targetLinkUri: "https://purl.imsglobal.org/spec/lti/claim/target_link_uri",
  resourceLink: "https://purl.imsglobal.org/spec/lti/claim/resource_link",
  roles: "https://purl.imsglobal.org/spec/lti/claim/roles",
  context: "https://purl.imsglobal.org/spec/lti/claim/context",
} as const;

export const LIS_ROLES = {
  instructor: "http://purl.imsglobal.org/vocab/lis/v2/membership#Instructor",
  teachingAssistant: "http://purl.imsglobal.org/vocab/lis/v2/membership/Instructor#TeachingAssistant",
  learner: "http://purl.imsglobal.org/vocab/lis/v2/membership#Learner",
  mentor: "http://purl.imsglobal.org/vocab/lis/v2/membership#Mentor",
} as const;

export interface FakePlatformPerson {
  sub: string;
  name: string;
  email: string;
  roles: string[];
}
export interface FakePlatformCourse {
  id: string;
  label: string;
  title: string;
}

/** Invented people and courses (demo data). */
export const FAKE_PLATFORM_PEOPLE: FakePlatformPerson[] = [
  { sub: "lp-1001", name: "Dr Ines Falk (invented instructor)", email: "i.falk@fake-platform.invalid", roles: [LIS_ROLES.instructor] },
  { sub: "lp-1002", name: "Jo Marsh (invented teaching assistant)", email: "j.marsh@fake-platform.invalid", roles: [LIS_ROLES.instructor, LIS_ROLES.teachingAssistant] },
  { sub: "lp-2001", name: "Theo Brandt (invented student)", email: "t.brandt@fake-platform.invalid", roles: [LIS_ROLES.learner] },
  { sub: "lp-2002", name: "Uma Reyes (invented student)", email: "u.reyes@fake-platform.invalid", roles: [LIS_ROLES.learner] },
  { sub: "lp-3001", name: "Pat Quill (invented parent)", email: "p.quill@fake-platform.invalid", roles: [LIS_ROLES.mentor] },
];
export const FAKE_PLATFORM_COURSES: FakePlatformCourse[] = [
  { id: "ctx-kin-201", label: "KIN-LTI", title: "Rate laws laboratory (invented platform course)" },
  { id: "ctx-kin-305", label: "KIN-LTI-2", title: "Advanced kinetics laboratory (invented platform course)" },
];

export interface FakePlatformOptions {
  port: number;
  clientId: string;
  deploymentId: string;
  /** the tool's login initiation and launch addresses */
  toolLoginUrl: string;
  toolLaunchUrl: string;
}

export interface FakePlatform {
  issuer: string;
  clientId: string;
  deploymentId: string;
  loginUrl: string;
  keySetUrl: string;
  people: FakePlatformPerson[];
  courses: FakePlatformCourse[];
  /** where a browser starts a launch of `person` into `course` (the platform's "open the tool" link) */
  launchUrl(personSub: string, courseId: string): string;
  /** the claims of a normal launch, for tests to change */
  launchClaims(person: FakePlatformPerson, course: FakePlatformCourse, nonce: string): JWTPayload;
  /** signs claims as the platform (or with a key the platform never published) */
  sign(claims: JWTPayload, options?: { foreignKey?: boolean; expiresInS?: number; issuedAgoS?: number }): Promise<string>;
  close(): Promise<void>;
}

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

export async function startFakePlatform(opts: FakePlatformOptions): Promise<FakePlatform> {
  const issuer = `http://127.0.0.1:${opts.port}`;
  const kid = `fake-platform-${crypto.randomBytes(4).toString("hex")}`;
  const { privateKey, publicKey } = await generateKeyPair("RS256");
  const foreign = await generateKeyPair("RS256");
  const publicJwk: JWK = { ...(await exportJWK(publicKey)), kid, alg: "RS256", use: "sig" };

  const people = FAKE_PLATFORM_PEOPLE;
  const courses = FAKE_PLATFORM_COURSES;

  function launchClaims(person: FakePlatformPerson, course: FakePlatformCourse, nonce: string): JWTPayload {
    return {
      nonce,
      name: person.name,
      email: person.email,
      [LTI.messageType]: "LtiResourceLinkRequest",
      [LTI.version]: "1.3.0",
      [LTI.deploymentId]: opts.deploymentId,
      [LTI.targetLinkUri]: opts.toolLaunchUrl,
      [LTI.resourceLink]: { id: `rl-${course.id}`, title: "Ratebook" },
      [LTI.roles]: person.roles,
      [LTI.context]: { id: course.id, label: course.label, title: course.title, type: ["http://purl.imsglobal.org/vocab/lis/v2/course#CourseOffering"] },
      sub: person.sub,
    };
  }

  async function sign(claims: JWTPayload, o: { foreignKey?: boolean; expiresInS?: number; issuedAgoS?: number } = {}) {
    const now = Math.floor(Date.now() / 1000) - (o.issuedAgoS ?? 0);
    const { sub, ...rest } = claims;
    let jwt = new SignJWT(rest)
      .setProtectedHeader({ alg: "RS256", kid, typ: "JWT" })
      .setIssuer(typeof claims.iss === "string" ? claims.iss : issuer)
      .setAudience(claims.aud ?? opts.clientId)
      .setIssuedAt(now)
      .setExpirationTime(now + (o.expiresInS ?? 300));
    if (sub) jwt = jwt.setSubject(sub);
    return jwt.sign((o.foreignKey ? foreign.privateKey : privateKey) as CryptoKey);
  }

  function launchUrl(personSub: string, courseId: string) {
    return `${issuer}/launch?person=${encodeURIComponent(personSub)}&course=${encodeURIComponent(courseId)}`;
  }

  const server = http.createServer(async (req, res) => {
    const url = new URL(req.url ?? "/", issuer);
    const html = (status: number, body: string) =>
      res.writeHead(status, { "content-type": "text/html; charset=utf-8" }).end(
        `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Fake Platform</title></head><body><p><strong>Fake Platform</strong> (a local test service with invented courses and people)</p>${body}</body></html>`,
      );
    try {
      if (url.pathname === "/jwks") {
        res.writeHead(200, { "content-type": "application/json" }).end(JSON.stringify({ keys: [publicJwk] }));
        return;
      }
      if (url.pathname === "/") {
        const rows = courses.flatMap((c) => people.map((p) => `<li><a href="${escape(launchUrl(p.sub, c.id))}">Open Ratebook in ${escape(c.label)} as ${escape(p.name)}</a></li>`));
        return html(200, `<h1>Courses</h1><ul>${rows.join("")}</ul>`);
      }
      // Third-party login initiation (LTI Core 1.3, 5.1.1): the platform sends the browser to the tool.
      if (url.pathname === "/launch") {
        const person = people.find((p) => p.sub === url.searchParams.get("person"));
        const course = courses.find((c) => c.id === url.searchParams.get("course"));
        if (!person || !course) return html(404, "<h1>No such person or course</h1>");
        const to = new URL(opts.toolLoginUrl);
        to.search = new URLSearchParams({
          iss: issuer,
          login_hint: person.sub,
          lti_message_hint: course.id,
          target_link_uri: opts.toolLaunchUrl,
          client_id: opts.clientId,
          lti_deployment_id: opts.deploymentId,
        }).toString();
        res.writeHead(302, { location: to.href }).end();
        return;
      }
      // The tool's authentication request (OIDC implicit flow, form_post): answered with the signed launch.
      if (url.pathname === "/auth") {
        const p = url.searchParams;
        const problems: string[] = [];
        if (p.get("client_id") !== opts.clientId) problems.push("unknown client_id");
        if (p.get("redirect_uri") !== opts.toolLaunchUrl) problems.push("redirect_uri is not registered");
        if (p.get("response_type") !== "id_token" || p.get("response_mode") !== "form_post" || p.get("scope") !== "openid") problems.push("not an LTI authentication request");
        if (!p.get("nonce") || !p.get("state")) problems.push("nonce and state are required");
        const person = people.find((x) => x.sub === p.get("login_hint"));
        const course = courses.find((x) => x.id === p.get("lti_message_hint"));
        if (!person || !course) problems.push("unknown login_hint or lti_message_hint");
        if (problems.length) return html(400, `<h1>Launch refused</h1><p>${escape(problems.join("; "))}</p>`);
        const idToken = await sign(launchClaims(person!, course!, p.get("nonce")!));
        return html(
          200,
          `<form id="launch" method="post" action="${escape(opts.toolLaunchUrl)}">
<input type="hidden" name="id_token" value="${escape(idToken)}"><input type="hidden" name="state" value="${escape(p.get("state")!)}">
<button type="submit">Continue to Ratebook</button></form><script>document.getElementById("launch").submit()</script>`,
        );
      }
      html(404, "<h1>Not found</h1>");
    } catch (error) {
      html(500, `<h1>Error</h1><p>${escape((error as Error).message)}</p>`);
    }
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  return {
    issuer,
    clientId: opts.clientId,
    deploymentId: opts.deploymentId,
    loginUrl: `${issuer}/auth`,
    keySetUrl: `${issuer}/jwks`,
    people,
    courses,
    launchUrl,
    launchClaims,
    sign,
    close: () => new Promise<void>((resolve) => {
      server.closeAllConnections();
      server.close(() => resolve());
    }),
  };
}
