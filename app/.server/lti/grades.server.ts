// Released marks sent to the learning platform through the LTI Assignment and Grade Services
// (1EdTech AGS 2.0): one line item per practical in each linked platform course, a score per
// student. Release (or a mark changed after release) only records what is to be sent and adds a
// queue job; the job gets an access token (1EdTech Security Framework 1.0, 4.1: OAuth 2 client
// credentials with a JWT client assertion signed by the tool's key), finds or makes the line item
// and posts each waiting score. A platform that is down leaves the scores waiting and the job is
// retried; a score already sent is not sent again unless the mark changed.
import crypto from "node:crypto";
import { exportJWK, generateKeyPair, importJWK, SignJWT, type JWK } from "jose";
import { QueryTypes, type Transaction } from "sequelize";
import { sequelize } from "../db/models.server";
import { GroupMember } from "../db/groups.server";
import { recordAudit } from "../audit.server";
import { buildSessionGradebook } from "../gradebook/session.server";
import { enqueue } from "../jobs/queue.server";

export const AGS_SCOPE = {
  lineItem: "https://purl.imsglobal.org/spec/lti-ags/scope/lineitem",
  score: "https://purl.imsglobal.org/spec/lti-ags/scope/score",
} as const;
const MEDIA = {
  lineItem: "application/vnd.ims.lis.v2.lineitem+json",
  lineItems: "application/vnd.ims.lis.v2.lineitemcontainer+json",
  score: "application/vnd.ims.lis.v1.score+json",
} as const;
/** Attempts of one send job before its scores are shown as failed (graphile-worker backs off exponentially). */
export const SEND_ATTEMPTS = 8;
/** A platform that does not answer in this time counts as down for this attempt. */
const PLATFORM_TIMEOUT_MS = 15_000;

// ---- the tool's signing key (published at /lti/jwks) ----

/** The newest tool key; the first call makes one (RS256, as LTI requires). */
async function currentToolKey(): Promise<{ kid: string; privateJwk: JWK }> {
  const read = () => sequelize.query<{ kid: string; private_jwk: JWK }>("select kid, private_jwk from lti_tool_keys order by created_at desc, id desc limit 1", { type: QueryTypes.SELECT });
  let [row] = await read();
  if (!row) {
    const { privateKey, publicKey } = await generateKeyPair("RS256", { extractable: true });
    const kid = `ratebook-${crypto.randomBytes(6).toString("hex")}`;
    const privateJwk = { ...(await exportJWK(privateKey)), kid, alg: "RS256" };
    const publicJwk = { ...(await exportJWK(publicKey)), kid, alg: "RS256", use: "sig" };
    await sequelize.query("insert into lti_tool_keys (kid, private_jwk, public_jwk, created_at) values (:kid, cast(:priv as jsonb), cast(:pub as jsonb), now())", { replacements: { kid, priv: JSON.stringify(privateJwk), pub: JSON.stringify(publicJwk) } });
    [row] = await read();
  }
  return { kid: row.kid, privateJwk: row.private_jwk };
}

/** The tool's public keys, for the platforms to check its client assertions. */
export async function toolKeySet(): Promise<{ keys: JWK[] }> {
  await currentToolKey();
  const rows = await sequelize.query<{ public_jwk: JWK }>("select public_jwk from lti_tool_keys order by created_at desc, id desc", { type: QueryTypes.SELECT });
  return { keys: rows.map((r) => r.public_jwk) };
}

// ---- talking to the platform ----

class PlatformTrouble extends Error {}

async function platformFetch(url: string, init: RequestInit, what: string): Promise<Response> {
  let res: Response;
  try {
    res = await fetch(url, { ...init, signal: AbortSignal.timeout(PLATFORM_TIMEOUT_MS), redirect: "error" });
  } catch (error) {
    throw new PlatformTrouble(`${what}: the platform did not answer (${(error as Error).name === "TimeoutError" ? `no answer in ${PLATFORM_TIMEOUT_MS / 1000} s` : (error as Error).message})`);
  }
  if (!res.ok) {
    const body = (await res.text().catch(() => "")).replace(/\s+/g, " ").slice(0, 200);
    throw new PlatformTrouble(`${what}: the platform answered ${res.status}${body ? ` (${body})` : ""}`);
  }
  return res;
}

interface PlatformRow { id: number; issuer: string; client_id: string; token_url: string | null; name: string }

async function accessToken(platform: PlatformRow, scopes: string[]): Promise<string> {
  if (!platform.token_url) throw new PlatformTrouble(`${platform.name} has no token address registered, so no marks can be sent (an admin registers it at Learning platforms)`);
  const key = await currentToolKey();
  const now = Math.floor(Date.now() / 1000);
  const assertion = await new SignJWT({})
    .setProtectedHeader({ alg: "RS256", kid: key.kid, typ: "JWT" })
    .setIssuer(platform.client_id).setSubject(platform.client_id).setAudience(platform.token_url)
    .setIssuedAt(now).setExpirationTime(now + 300).setJti(crypto.randomUUID())
    .sign(await importJWK(key.privateJwk, "RS256"));
  const res = await platformFetch(platform.token_url, {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded", accept: "application/json" },
    body: new URLSearchParams({ grant_type: "client_credentials", client_assertion_type: "urn:ietf:params:oauth:client-assertion-type:jwt-bearer", client_assertion: assertion, scope: scopes.join(" ") }),
  }, "Access token");
  const body = (await res.json().catch(() => null)) as { access_token?: unknown } | null;
  if (typeof body?.access_token !== "string") throw new PlatformTrouble("Access token: the platform's answer holds no access_token");
  return body.access_token;
}

/** The practical's line item in the platform course: found by its resourceId, else made (AGS 2.0, 3.2). */
async function lineItemOf(token: string, ctx: ContextRow, session: { id: number; title: string }): Promise<string> {
  const known = await sequelize.query<{ url: string }>("select url from lti_line_items where lti_context_id = :c and session_id = :s", { type: QueryTypes.SELECT, replacements: { c: ctx.id, s: session.id } });
  if (known[0]) return known[0].url;
  const resourceId = `ratebook-practical-${session.id}`;
  const search = new URL(ctx.lineitems_url);
  search.searchParams.set("resource_id", resourceId);
  const listed = (await (await platformFetch(search.href, { headers: { authorization: `Bearer ${token}`, accept: MEDIA.lineItems } }, "Line items")).json().catch(() => [])) as Array<{ id?: unknown; resourceId?: unknown }>;
  let url = Array.isArray(listed) ? listed.find((li) => li.resourceId === resourceId && typeof li.id === "string")?.id as string | undefined : undefined;
  if (!url) {
    const res = await platformFetch(ctx.lineitems_url, {
      method: "POST",
      headers: { authorization: `Bearer ${token}`, "content-type": MEDIA.lineItem, accept: MEDIA.lineItem },
      body: JSON.stringify({ scoreMaximum: 100, label: session.title.slice(0, 200), resourceId, tag: "ratebook-mark" }),
    }, "New line item");
    const made = (await res.json().catch(() => null)) as { id?: unknown } | null;
    if (typeof made?.id !== "string") throw new PlatformTrouble("New line item: the platform's answer holds no id");
    url = made.id;
  }
  await sequelize.query("insert into lti_line_items (lti_context_id, session_id, url, created_at) values (:c, :s, :url, now()) on conflict (lti_context_id, session_id) do nothing", { replacements: { c: ctx.id, s: session.id, url } });
  return url;
}

/** The scores address of a line item: its path + /scores, keeping any query (AGS 2.0, 3.4). */
function scoresUrlOf(lineItemUrl: string): string {
  const u = new URL(lineItemUrl);
  u.pathname = `${u.pathname.replace(/\/$/, "")}/scores`;
  return u.href;
}

// ---- what is to be sent ----

interface ContextRow { id: number; platform_id: number; lineitems_url: string; ags_scopes: string[] }

async function scoringContexts(courseId: number, transaction?: Transaction): Promise<ContextRow[]> {
  return sequelize.query<ContextRow>("select id, platform_id, lineitems_url, ags_scopes from lti_contexts where course_id = :courseId and lineitems_url is not null order by id", { type: QueryTypes.SELECT, replacements: { courseId }, transaction });
}

/**
 * Records each student's current mark for every platform course linked to the practical's course
 * (only students the platform knows: an lti_accounts row) and marks a score waiting when the
 * platform does not hold that mark yet. Returns how many scores are waiting.
 */
async function planScores(sessionId: number, courseId: number, transaction?: Transaction): Promise<number> {
  const contexts = await scoringContexts(courseId, transaction);
  if (!contexts.length) return 0;
  const book = await buildSessionGradebook(sessionId);
  if (!book) return 0;
  const markOfGroup = new Map(book.rows.filter((r) => r.mark !== null).map((r) => [r.groupId, r.mark as number]));
  const members = markOfGroup.size ? await GroupMember.findAll({ where: { groupId: [...markOfGroup.keys()] }, attributes: ["groupId", "userId"], transaction }) : [];
  for (const ctx of contexts) {
    const accounts = new Set((await sequelize.query<{ user_id: number }>("select user_id from lti_accounts where platform_id = :p", { type: QueryTypes.SELECT, replacements: { p: ctx.platform_id }, transaction })).map((r) => r.user_id));
    for (const m of members) {
      if (!accounts.has(m.userId)) continue;
      const mark = markOfGroup.get(m.groupId)!;
      await sequelize.query(
        `insert into lti_scores (lti_context_id, session_id, user_id, mark, state, updated_at) values (:c, :s, :u, :mark, 'waiting', now())
         on conflict (lti_context_id, session_id, user_id) do update set mark = excluded.mark, updated_at = now(),
           state = case when lti_scores.sent_mark is not distinct from excluded.mark then 'sent' else 'waiting' end,
           attempts = case when lti_scores.mark is distinct from excluded.mark then 0 else lti_scores.attempts end
         where lti_scores.mark is distinct from excluded.mark or (lti_scores.state = 'failed' and lti_scores.sent_mark is distinct from excluded.mark)`,
        { replacements: { c: ctx.id, s: sessionId, u: m.userId, mark }, transaction },
      );
    }
  }
  const [{ n }] = await sequelize.query<{ n: number }>("select count(*)::int as n from lti_scores where session_id = :s and state = 'waiting'", { type: QueryTypes.SELECT, replacements: { s: sessionId }, transaction });
  return n;
}

/**
 * Called where marks are released or changed after release: records the scores to send and adds
 * the send job in the caller's transaction (one waiting job per practical: its key; one running at a time: its queue). Nothing is
 * sent here, so a slow platform never holds up the request.
 */
export async function queueScoresToPlatform(session: { id: number; courseId: number }, transaction?: Transaction): Promise<number> {
  const [row] = await sequelize.query<{ released: boolean }>("select marks_released_at is not null as released from lab_sessions where id = :id", { type: QueryTypes.SELECT, replacements: { id: session.id }, transaction });
  if (!row?.released) return 0;
  const waiting = await planScores(session.id, session.courseId, transaction);
  if (waiting) await enqueue("lti-send-scores", { sessionId: session.id }, { transaction, jobKey: `lti-send-scores:${session.id}`, queueName: `lti-scores-${session.id}`, maxAttempts: SEND_ATTEMPTS });
  return waiting;
}

/** Waiting scores of a practical, posted to each platform; throws (so the job is retried) when any could not be sent. */
export async function sendWaitingScores(sessionId: number, attempt: { number: number; last: boolean }): Promise<{ sent: number; failed: number }> {
  const [session] = await sequelize.query<{ id: number; title: string; course_id: number }>("select id, title, course_id from lab_sessions where id = :id", { type: QueryTypes.SELECT, replacements: { id: sessionId } });
  if (!session) return { sent: 0, failed: 0 };
  let sent = 0;
  let failed = 0;
  const troubles: string[] = [];
  for (const ctx of await scoringContexts(session.course_id)) {
    const waiting = await sequelize.query<{ id: number; user_id: number; mark: number; subject: string }>(
      `select sc.id, sc.user_id, sc.mark, a.subject from lti_scores sc join lti_accounts a on a.user_id = sc.user_id and a.platform_id = :p
       where sc.lti_context_id = :c and sc.session_id = :s and sc.state = 'waiting' order by sc.id`,
      { type: QueryTypes.SELECT, replacements: { c: ctx.id, s: sessionId, p: ctx.platform_id } },
    );
    if (!waiting.length) continue;
    const [platform] = await sequelize.query<PlatformRow>("select id, issuer, client_id, token_url, name from lti_platforms where id = :p", { type: QueryTypes.SELECT, replacements: { p: ctx.platform_id } });
    const fail = async (ids: number[], message: string) => {
      failed += ids.length;
      troubles.push(message);
      await sequelize.query(`update lti_scores set attempts = attempts + 1, last_error = :message, state = :state, updated_at = now() where id in (:ids) and state = 'waiting'`, { replacements: { ids, message: message.slice(0, 1000), state: attempt.last ? "failed" : "waiting" } });
      await recordAudit({ actorId: null, action: "lti-score.failed", entityType: "lab_session", entityId: sessionId, after: { platform: platform.issuer, lineitems: ctx.lineitems_url, scores: ids.length, attempt: attempt.number, error: message.slice(0, 300), givenUp: attempt.last } });
    };
    let token: string;
    let lineItem: string;
    try {
      token = await accessToken(platform, [AGS_SCOPE.lineItem, AGS_SCOPE.score]);
      lineItem = await lineItemOf(token, ctx, session);
    } catch (error) {
      if (!(error instanceof PlatformTrouble)) throw error;
      await fail(waiting.map((w) => w.id), error.message);
      continue;
    }
    for (const w of waiting) {
      const score = { userId: w.subject, scoreGiven: w.mark, scoreMaximum: 100, activityProgress: "Completed", gradingProgress: "FullyGraded", timestamp: new Date().toISOString() };
      try {
        await platformFetch(scoresUrlOf(lineItem), { method: "POST", headers: { authorization: `Bearer ${token}`, "content-type": MEDIA.score }, body: JSON.stringify(score) }, "Score");
      } catch (error) {
        if (!(error instanceof PlatformTrouble)) throw error;
        await fail([w.id], error.message);
        continue;
      }
      // Only the mark that was posted counts as sent: a change meanwhile stays waiting.
      await sequelize.transaction(async (transaction) => {
        await sequelize.query(`update lti_scores set sent_mark = :mark, sent_at = now(), last_error = null, state = case when mark is not distinct from :mark then 'sent' else 'waiting' end, updated_at = now() where id = :id`, { replacements: { id: w.id, mark: w.mark }, transaction });
        await recordAudit({ actorId: null, action: "lti-score.sent", entityType: "lab_session", entityId: sessionId, after: { platform: platform.issuer, lineItem, userId: w.user_id, subject: w.subject, scoreGiven: w.mark, scoreMaximum: 100 } }, transaction);
      });
      sent++;
    }
  }
  if (troubles.length) throw new Error(`${failed} score(s) not sent (${attempt.last ? "given up" : "will be retried"}): ${[...new Set(troubles)].join("; ")}`);
  return { sent, failed };
}

export interface PlatformScoreRow {
  student: string;
  email: string;
  platform: string;
  mark: number;
  sentMark: number | null;
  state: "waiting" | "sent" | "failed";
  attempts: number;
  lastError: string | null;
  sentAt: string | null;
}

/** What was sent to the platforms for a practical and what was not, for its instructors. */
export async function platformScores(sessionId: number): Promise<PlatformScoreRow[]> {
  return sequelize.query<PlatformScoreRow>(
    `select u.display_name as student, u.email, p.name as platform, sc.mark, sc.sent_mark as "sentMark", sc.state, sc.attempts, sc.last_error as "lastError", sc.sent_at as "sentAt"
     from lti_scores sc join users u on u.id = sc.user_id join lti_contexts c on c.id = sc.lti_context_id join lti_platforms p on p.id = c.platform_id
     where sc.session_id = :s order by u.display_name, p.name`,
    { type: QueryTypes.SELECT, replacements: { s: sessionId } },
  );
}

/** The instructor's "send again": failed scores wait again and a fresh job is added. */
export async function resendFailedScores(actorId: number, session: { id: number; courseId: number }): Promise<number> {
  return sequelize.transaction(async (transaction) => {
    const [, meta] = await sequelize.query("update lti_scores set state = 'waiting', attempts = 0, updated_at = now() where session_id = :s and state = 'failed'", { replacements: { s: session.id }, transaction });
    const again = (meta as { rowCount?: number })?.rowCount ?? 0;
    // The given-up job is replaced by the new one (its failure stays in lti_scores' history and the audit log).
    await sequelize.query(
      `delete from graphile_worker._private_jobs where attempts >= max_attempts and (payload->>'sessionId')::int = :s
         and task_id = (select id from graphile_worker._private_tasks where identifier = 'lti-send-scores')`,
      { replacements: { s: session.id }, transaction },
    );
    await queueScoresToPlatform(session, transaction);
    await recordAudit({ actorId, action: "lti-score.resend", entityType: "lab_session", entityId: session.id, after: { scores: again } }, transaction);
    return again;
  });
}
