// Personal API tokens: made on the account page or by POST /api/tokens, shown once, kept only as
// their SHA-256, sent as `Authorization: Bearer <token>` on the JSON API and the downloads.
// A revoked or expired token is refused at once: every request looks its row up.
import crypto from "node:crypto";
import { Op, QueryTypes, type Transaction } from "sequelize";
import { sequelize, User } from "./db/models.server";
import { ApiToken } from "./db/api-token.server";
import { recordAudit } from "./audit.server";

export const TOKEN_PREFIX = "rbk_";
export const MAX_TOKEN_DAYS = 366;
/** live (not revoked, not expired) tokens a person may hold at once */
export const MAX_LIVE_TOKENS = 10;
export const TOKEN_CAP_MESSAGE = `You already have ${MAX_LIVE_TOKENS} live API tokens, the most one person may hold. Revoke one you no longer use on your account page, then make the new one.`;

/** The person holds the most live tokens allowed; nothing was made. */
export class TokenCapError extends Error {
  constructor() {
    super(TOKEN_CAP_MESSAGE);
  }
}
const NAME_MAX = 80;
/** last_used_at is written at most this often, so reads stay reads. */
const TOUCH_EVERY_MS = 5 * 60 * 1000;

export interface TokenProblem {
  path: string;
  message: string;
}

function digest(token: string) {
  return crypto.createHash("sha256").update(token).digest("hex");
}

/** Checks a request to make a token: `{ name, expiresInDays? }` from JSON or a form. */
export function checkTokenRequest(input: unknown): { ok: true; name: string; expiresInDays: number | null } | { ok: false; errors: TokenProblem[] } {
  const errors: TokenProblem[] = [];
  const body = (input && typeof input === "object" ? input : {}) as Record<string, unknown>;
  const name = typeof body.name === "string" ? body.name.trim() : "";
  if (typeof body.name !== "string" && body.name !== undefined) errors.push({ path: "name", message: "name must be text." });
  else if (!name) errors.push({ path: "name", message: "Give the token a name, so you can tell it apart later (for example “marks export script”)." });
  else if (name.length > NAME_MAX) errors.push({ path: "name", message: `Use at most ${NAME_MAX} characters for the name (this one has ${name.length}).` });
  let expiresInDays: number | null = null;
  const raw = body.expiresInDays;
  if (raw !== undefined && raw !== null && raw !== "") {
    const n = typeof raw === "string" && /^\s*\d+\s*$/.test(raw) ? Number(raw) : raw;
    if (typeof n !== "number" || !Number.isInteger(n) || n < 1 || n > MAX_TOKEN_DAYS) {
      errors.push({ path: "expiresInDays", message: `expiresInDays must be a whole number of days from 1 to ${MAX_TOKEN_DAYS}, or left out for a token that does not expire.` });
    } else expiresInDays = n;
  }
  return errors.length ? { ok: false, errors } : { ok: true, name, expiresInDays };
}

export interface NewToken {
  id: number;
  /** the token itself: shown this once, never stored */
  token: string;
  name: string;
  expiresAt: Date | null;
}

export async function createApiToken(user: Pick<User, "id">, name: string, expiresInDays: number | null, now = new Date()): Promise<NewToken> {
  const token = TOKEN_PREFIX + crypto.randomBytes(32).toString("base64url");
  const expiresAt = expiresInDays ? new Date(now.getTime() + expiresInDays * 86_400_000) : null;
  const row = await sequelize.transaction(async (transaction) => {
    // the person's row is locked so two requests at once cannot both pass the cap
    await User.findByPk(user.id, { transaction, lock: transaction.LOCK.UPDATE, attributes: ["id"] });
    const live = await ApiToken.count({ where: { userId: user.id, revokedAt: null, [Op.or]: [{ expiresAt: null }, { expiresAt: { [Op.gt]: now } }] }, transaction });
    if (live >= MAX_LIVE_TOKENS) throw new TokenCapError();
    const created = await ApiToken.create(
      { userId: user.id, name, tokenHash: digest(token), tokenStart: token.slice(0, 10), expiresAt, createdAt: now },
      { transaction },
    );
    await recordAudit({ actorId: user.id, action: "api-token.created", entityType: "api_token", entityId: created.id, after: { name, expiresAt } }, transaction);
    return created;
  });
  return { id: row.id, token, name, expiresAt };
}

export type TokenState = "live" | "expired" | "revoked";

export interface TokenListItem {
  id: number;
  name: string;
  tokenStart: string;
  createdAt: Date;
  expiresAt: Date | null;
  lastUsedAt: Date | null;
  state: TokenState;
}

/** A person's tokens, newest first, with whether each still works. */
export async function apiTokensOf(userId: number, now = new Date()): Promise<TokenListItem[]> {
  const rows = await ApiToken.findAll({ where: { userId }, order: [["id", "DESC"]] });
  return rows.map((t) => ({
    id: t.id,
    name: t.name,
    tokenStart: t.tokenStart,
    createdAt: t.createdAt,
    expiresAt: t.expiresAt,
    lastUsedAt: t.lastUsedAt,
    state: t.revokedAt ? "revoked" : t.expiresAt && t.expiresAt <= now ? "expired" : "live",
  }));
}

/** Revokes one of the person's tokens; false when it is not theirs (or does not exist). Revoking twice is fine. */
export async function revokeApiToken(userId: number, tokenId: number, now = new Date()): Promise<boolean> {
  return sequelize.transaction(async (transaction) => {
    const token = await ApiToken.findOne({ where: { id: tokenId, userId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!token) return false;
    if (!token.revokedAt) {
      await token.update({ revokedAt: now }, { transaction });
      await recordAudit({ actorId: userId, action: "api-token.revoked", entityType: "api_token", entityId: token.id, before: { name: token.name } }, transaction);
    }
    return true;
  });
}

export type TokenEndReason = "password-changed" | "password-reset" | "role-lowered";

/**
 * Revokes every live token of a person, in the caller's transaction: whoever knew the old
 * password, or the powers the account had, may have made them. Audited once with the count.
 */
export async function revokeAllApiTokensOf(userId: number, reason: TokenEndReason, transaction: Transaction, now = new Date()): Promise<number> {
  const [count] = await ApiToken.update({ revokedAt: now }, { where: { userId, revokedAt: null }, transaction });
  if (count) await recordAudit({ actorId: null, action: "api-token.revoked-all", entityType: "user", entityId: userId, after: { reason, count } }, transaction);
  return count;
}

/** The Bearer token of a request: undefined without an Authorization: Bearer header, "" when malformed. */
export function bearerTokenOf(request: Request): string | undefined {
  const header = request.headers.get("authorization");
  if (!header) return undefined;
  const m = /^Bearer\s+(\S*)\s*$/i.exec(header);
  if (!m) return /^Bearer\b/i.test(header) ? "" : undefined;
  return m[1];
}

const TOKEN_WITH_USER = `
  select t.id as "tokenId", t.revoked_at as "revokedAt", t.expires_at as "expiresAt", t.last_used_at as "lastUsedAt",
         u.id, u.email, u.password_hash as "passwordHash", u.role, u.display_name as "displayName",
         u.created_at as "createdAt", u.updated_at as "updatedAt"
    from api_tokens t join users u on u.id = t.user_id
   where t.token_hash = $1`;

export type BearerLookup = { ok: true; user: User; tokenId: number } | { ok: false; message: string };

/** Who a Bearer token belongs to, or why it is refused. One plain query (it runs on every API call). */
export async function personOfToken(token: string, now = new Date()): Promise<BearerLookup> {
  if (!token.startsWith(TOKEN_PREFIX) || token.length < 20) return { ok: false, message: "That is not a Ratebook API token." };
  const [row] = await sequelize.query<Record<string, any>>(TOKEN_WITH_USER, { bind: [digest(token)], type: QueryTypes.SELECT });
  if (!row) return { ok: false, message: "This API token is not known. Make a new one on your account page." };
  if (row.revokedAt) return { ok: false, message: "This API token was revoked. Make a new one on your account page." };
  if (row.expiresAt && new Date(row.expiresAt) <= now) return { ok: false, message: "This API token has expired. Make a new one on your account page." };
  const { tokenId, revokedAt: _r, expiresAt: _e, lastUsedAt, ...userRow } = row;
  if (!lastUsedAt || now.getTime() - new Date(lastUsedAt).getTime() > TOUCH_EVERY_MS) {
    await ApiToken.update({ lastUsedAt: now }, { where: { id: tokenId } });
  }
  return { ok: true, user: User.build(userRow as never, { isNewRecord: false, raw: true }), tokenId };
}

/** Paths that take a Bearer token: the JSON API and the spreadsheet downloads; pages never do. */
export function acceptsBearer(pathname: string): boolean {
  return pathname.startsWith("/api/") || /\/export\.(xlsx|csv)$/.test(pathname);
}
