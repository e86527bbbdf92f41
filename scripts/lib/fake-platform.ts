// A local fake learning platform for the demo and the tests: it starts LTI 1.3 launches of
// invented courses and people (login initiation, then a signed ID token posted back to the tool),
// publishes its key set, and can sign any claims the tests ask for, with its own key or another.
// Signing and the key set are jose's (a standard JOSE library); nothing here is used in production.
import http from "node:http";
import crypto from "node:crypto";
import { createLocalJWKSet, createRemoteJWKSet, exportJWK, generateKeyPair, jwtVerify, SignJWT, type CryptoKey, type JSONWebKeySet, type JWK, type JWTPayload } from "jose";

export const LTI = {
  messageType: "https://purl.imsglobal.org/spec/lti/claim/message_type",
  version: "https://purl.imsglobal.org/spec/lti/claim/version",
  deploymentId: "https://purl.imsglobal.org/spec/lti/claim/deployment_id",
  targetLinkUri: "https://purl.imsglobal.org/spec/lti/claim/target_link_uri",
  resourceLink: "https://purl.imsglobal.org/spec/lti/claim/resource_link",
  roles: "https://purl.imsglobal.org/spec/lti/claim/roles",
  context: "https://purl.imsglobal.org/spec/lti/claim/context",
  agsEndpoint: "https://purl.imsglobal.org/spec/lti-ags/claim/endpoint",
} as const;

export const AGS_SCOPES = {
  lineItem: "https://purl.imsglobal.org/spec/lti-ags/scope/lineitem",
  score: "https://purl.imsglobal.org/spec/lti-ags/scope/score",
} as const;

/** A line item the tool made in a fake platform course (AGS 2.0, 3.2). */
export interface FakeLineItem {
  id: string;
  contextId: string;
  label: string;
  resourceId: string | null;
  tag: string | null;
  scoreMaximum: number;
}
/** A score the fake platform accepted (AGS 2.0, 3.4), with the line item it went to. */
export interface FakeScore {
  lineItemId: string;
  userId: string;
  scoreGiven: number;
  scoreMaximum: number;
  activityProgress: string;
  gradingProgress: string;
  timestamp: string;
}

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
  /** the tool's public keys for its client assertions: its JWKS address, or the set itself (tests) */
  toolKeySet?: string | (() => Promise<JSONWebKeySet>);
}

export interface FakePlatform {
  issuer: string;
  clientId: string;
  deploymentId: string;
  loginUrl: string;
  keySetUrl: string;
  /** OAuth 2 token endpoint (client credentials with a JWT client assertion) */
  tokenUrl: string;
  people: FakePlatformPerson[];
  /** line items the tool made, and the scores received, in order */
  lineItems: FakeLineItem[];
  scores: FakeScore[];
  /** requests refused, with why (bad token, bad score), for tests to read */
  refusals: string[];
  /** the next `n` token and grade requests are answered 503 (an outage) */
  failNext(n: number): void;
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
      [LTI.agsEndpoint]: { scope: [AGS_SCOPES.lineItem, AGS_SCOPES.score], lineitems: `${issuer}/contexts/${encodeURIComponent(course.id)}/lineitems` },
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

  const tokenUrl = `${issuer}/token`;
  const lineItems: FakeLineItem[] = [];
  const scores: FakeScore[] = [];
  const refusals: string[] = [];
  const tokens = new Map<string, { scopes: string[]; expires: number }>();
  const usedJti = new Set<string>();
  let outage = 0;
  const toolKeys = typeof opts.toolKeySet === "string" ? createRemoteJWKSet(new URL(opts.toolKeySet)) : null;

  const readBody = (req: http.IncomingMessage) => new Promise<string>((resolve, reject) => {
    let body = "";
    req.setEncoding("utf8");
    req.on("data", (c: string) => { body += c; if (body.length > 100_000) req.destroy(); });
    req.on("end", () => resolve(body));
    req.on("error", reject);
  });
  const json = (res: http.ServerResponse, status: number, body: unknown, type = "application/json") => res.writeHead(status, { "content-type": type }).end(JSON.stringify(body));
  const refuse = (res: http.ServerResponse, status: number, why: string) => {
    refusals.push(why);
    json(res, status, { error: why });
  };

  /** Token request (1EdTech Security Framework 1.0, 4.1): the client assertion is checked with the tool's published keys. */
  async function token(req: http.IncomingMessage, res: http.ServerResponse) {
    const form = new URLSearchParams(await readBody(req));
    if (form.get("grant_type") !== "client_credentials") return refuse(res, 400, "grant_type must be client_credentials");
    if (form.get("client_assertion_type") !== "urn:ietf:params:oauth:client-assertion-type:jwt-bearer") return refuse(res, 400, "client_assertion_type must be jwt-bearer");
    if (!opts.toolKeySet) return refuse(res, 400, "the tool's key set is not configured");
    try {
      const keys = toolKeys ?? createLocalJWKSet(await (opts.toolKeySet as () => Promise<JSONWebKeySet>)());
      const { payload } = await jwtVerify(form.get("client_assertion") ?? "", keys, { issuer: opts.clientId, subject: opts.clientId, audience: tokenUrl, algorithms: ["RS256"] });
      if (!payload.jti || usedJti.has(payload.jti)) return refuse(res, 400, "client assertion jti missing or used before");
      usedJti.add(payload.jti);
    } catch (error) {
      return refuse(res, 401, `client assertion refused: ${(error as Error).message}`);
    }
    const granted = (form.get("scope") ?? "").split(" ").filter((x) => (Object.values(AGS_SCOPES) as string[]).includes(x));
    const accessToken = crypto.randomBytes(24).toString("base64url");
    tokens.set(accessToken, { scopes: granted, expires: Date.now() + 3600_000 });
    json(res, 200, { access_token: accessToken, token_type: "Bearer", expires_in: 3600, scope: granted.join(" ") });
  }

  function bearer(req: http.IncomingMessage, scope: string): string | null {
    const m = /^Bearer (.+)$/.exec(req.headers.authorization ?? "");
    const t = m ? tokens.get(m[1]) : undefined;
    if (!t || t.expires < Date.now()) return "no valid access token";
    if (!t.scopes.includes(scope)) return `the access token lacks ${scope}`;
    return null;
  }

  /** Line item container and scores (AGS 2.0, 3.2 and 3.4), with the checks a platform makes. */
  async function grades(req: http.IncomingMessage, res: http.ServerResponse, url: URL, contextId: string, rest: string[]) {
    if (!courses.some((c) => c.id === contextId)) return refuse(res, 404, `no course ${contextId}`);
    if (rest.length === 0) {
      const why = bearer(req, AGS_SCOPES.lineItem);
      if (why) return refuse(res, 401, why);
      if (req.method === "GET") {
        const rid = url.searchParams.get("resource_id");
        return json(res, 200, lineItems.filter((li) => li.contextId === contextId && (!rid || li.resourceId === rid)), "application/vnd.ims.lis.v2.lineitemcontainer+json");
      }
      if (req.method !== "POST") return refuse(res, 405, "line items: GET or POST");
      if (!String(req.headers["content-type"]).startsWith("application/vnd.ims.lis.v2.lineitem+json")) return refuse(res, 415, "a line item is application/vnd.ims.lis.v2.lineitem+json");
      const body = JSON.parse((await readBody(req)) || "null") as Partial<FakeLineItem> | null;
      if (!body || typeof body.label !== "string" || !body.label || typeof body.scoreMaximum !== "number" || !(body.scoreMaximum > 0)) return refuse(res, 400, "a line item needs a label and a scoreMaximum above 0");
      const item: FakeLineItem = { id: `${issuer}/contexts/${encodeURIComponent(contextId)}/lineitems/${lineItems.length + 1}`, contextId, label: body.label, resourceId: body.resourceId ?? null, tag: body.tag ?? null, scoreMaximum: body.scoreMaximum };
      lineItems.push(item);
      return json(res, 201, item, "application/vnd.ims.lis.v2.lineitem+json");
    }
    if (rest.length === 2 && rest[1] === "scores") {
      const item = lineItems.find((li) => li.id === `${issuer}/contexts/${encodeURIComponent(contextId)}/lineitems/${rest[0]}`);
      if (!item) return refuse(res, 404, `no line item ${rest[0]}`);
      const why = bearer(req, AGS_SCOPES.score);
      if (why) return refuse(res, 401, why);
      if (req.method !== "POST") return refuse(res, 405, "scores: POST");
      if (!String(req.headers["content-type"]).startsWith("application/vnd.ims.lis.v1.score+json")) return refuse(res, 415, "a score is application/vnd.ims.lis.v1.score+json");
      const s = JSON.parse((await readBody(req)) || "null") as Partial<FakeScore> | null;
      const person = people.find((p) => p.sub === s?.userId);
      if (!s || !person) return refuse(res, 400, `score for unknown user ${String(s?.userId)}`);
      if (!person.roles.includes(LIS_ROLES.learner)) return refuse(res, 400, `score for ${person.sub}, who is not a learner`);
      if (typeof s.scoreGiven !== "number" || typeof s.scoreMaximum !== "number" || s.scoreGiven < 0 || s.scoreGiven > s.scoreMaximum) return refuse(res, 400, "scoreGiven must be a number from 0 to scoreMaximum");
      if (!["Initialized", "Started", "InProgress", "Submitted", "Completed"].includes(String(s.activityProgress))) return refuse(res, 400, "bad activityProgress");
      if (!["FullyGraded", "Pending", "PendingManual", "Failed", "NotReady"].includes(String(s.gradingProgress))) return refuse(res, 400, "bad gradingProgress");
      if (typeof s.timestamp !== "string" || Number.isNaN(Date.parse(s.timestamp))) return refuse(res, 400, "timestamp must be an ISO 8601 time");
      const last = scores.filter((x) => x.lineItemId === item.id && x.userId === s.userId).at(-1);
      if (last && Date.parse(last.timestamp) >= Date.parse(s.timestamp)) return refuse(res, 409, "a score's timestamp must be later than the last one");
      scores.push({ lineItemId: item.id, userId: s.userId!, scoreGiven: s.scoreGiven, scoreMaximum: s.scoreMaximum, activityProgress: s.activityProgress!, gradingProgress: s.gradingProgress!, timestamp: s.timestamp });
      return res.writeHead(204).end();
    }
    refuse(res, 404, "no such grade address");
  }

  const server = http.createServer(async (req, res) => {
    const url = new URL(req.url ?? "/", issuer);
    const html = (status: number, body: string) =>
      res.writeHead(status, { "content-type": "text/html; charset=utf-8" }).end(
        `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Fake Platform</title></head><body><p><strong>Fake Platform</strong> (a local test service with invented courses and people)</p>${body}</body></html>`,
      );
    try {
      if (url.pathname === "/token" || url.pathname.startsWith("/contexts/")) {
        if (outage > 0) {
          outage--;
          return res.writeHead(503, { "content-type": "text/plain" }).end("Fake Platform is down for maintenance");
        }
        if (url.pathname === "/token") return req.method === "POST" ? await token(req, res) : refuse(res, 405, "token: POST");
        const [, , ctx, what, ...rest] = url.pathname.split("/");
        if (what !== "lineitems") return refuse(res, 404, "no such grade address");
        return await grades(req, res, url, decodeURIComponent(ctx), rest);
      }
      if (url.pathname === "/jwks") {
        res.writeHead(200, { "content-type": "application/json" }).end(JSON.stringify({ keys: [publicJwk] }));
        return;
      }
      if (url.pathname === "/") {
        const received = scores.map((x) => `<li>${escape(x.userId)}: ${x.scoreGiven} / ${x.scoreMaximum} on ${escape(lineItems.find((li) => li.id === x.lineItemId)?.label ?? x.lineItemId)} (${escape(x.timestamp)})</li>`);
        const rows = courses.flatMap((c) => people.map((p) => `<li><a href="${escape(launchUrl(p.sub, c.id))}">Open Ratebook in ${escape(c.label)} as ${escape(p.name)}</a></li>`));
        return html(200, `<h1>Courses</h1><ul>${rows.join("")}</ul><h2>Scores received</h2>${received.length ? `<ul>${received.join("")}</ul>` : "<p>None yet.</p>"}`);
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
    tokenUrl,
    lineItems,
    scores,
    refusals,
    failNext: (n: number) => { outage = n; },
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
