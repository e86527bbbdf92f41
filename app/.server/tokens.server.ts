// Single-use, expiring tokens for invitations and password resets. Only a SHA-256 of the
// token is stored, so a leaked database cannot be used to take over accounts.
import crypto from "node:crypto";
import type { Transaction } from "sequelize";
import { AuthToken, User, type TokenPurpose } from "./db/models.server";

export const TOKEN_LIFETIME_MS: Record<TokenPurpose, number> = {
  invitation: 7 * 24 * 60 * 60 * 1000,
  "password-reset": 60 * 60 * 1000,
};

function digest(token: string) {
  return crypto.createHash("sha256").update(token).digest("hex");
}

export async function issueToken(
  userId: number,
  purpose: TokenPurpose,
  createdById: number | null,
  transaction?: Transaction,
  now = new Date(),
): Promise<string> {
  const token = crypto.randomBytes(32).toString("base64url");
  // Only the newest link of a kind works: a re-sent invitation or reset replaces older ones.
  await AuthToken.destroy({ where: { userId, purpose, usedAt: null }, transaction });
  await AuthToken.create(
    {
      userId,
      purpose,
      tokenHash: digest(token),
      expiresAt: new Date(now.getTime() + TOKEN_LIFETIME_MS[purpose]),
      createdById,
    },
    { transaction },
  );
  return token;
}

export type TokenCheck =
  | { ok: true; token: AuthToken; user: User }
  | { ok: false; reason: "unknown" | "used" | "expired"; message: string };

const REASON_TEXT: Record<TokenPurpose, Record<"unknown" | "used" | "expired", string>> = {
  invitation: {
    unknown: "This invitation link is not valid: check that the whole link was copied, or use the newest invitation e-mail (a new one replaces older links).",
    used: "This invitation has already been accepted. Sign in with your e-mail and password.",
    expired: "This invitation has expired. Ask the person who invited you to send a new one.",
  },
  "password-reset": {
    unknown: "This reset link is not valid: check that the whole link was copied, or use the newest reset e-mail (a new one replaces older links).",
    used: "This reset link has already been used. Ask for a new one if you still need it.",
    expired: "This reset link has expired (links last one hour). Ask for a new one.",
  },
};

export function tokenMessage(purpose: TokenPurpose, reason: "unknown" | "used" | "expired") {
  return REASON_TEXT[purpose][reason];
}

/** Looks a token up without using it. */
export async function checkToken(raw: string, purpose: TokenPurpose, now = new Date()): Promise<TokenCheck> {
  const token = raw ? await AuthToken.findOne({ where: { tokenHash: digest(raw), purpose }, include: [{ model: User, as: "user" }] }) : null;
  if (!token || !token.user) return { ok: false, reason: "unknown", message: REASON_TEXT[purpose].unknown };
  if (token.usedAt) return { ok: false, reason: "used", message: REASON_TEXT[purpose].used };
  if (token.expiresAt.getTime() <= now.getTime()) return { ok: false, reason: "expired", message: REASON_TEXT[purpose].expired };
  return { ok: true, token, user: token.user };
}

/**
 * Marks the token used inside `transaction`; the conditional update makes a second, concurrent
 * use fail instead of succeeding twice.
 */
export async function consumeToken(token: AuthToken, transaction: Transaction, now = new Date()): Promise<boolean> {
  const [count] = await AuthToken.update(
    { usedAt: now },
    { where: { id: token.id, usedAt: null }, transaction },
  );
  return count === 1;
}
