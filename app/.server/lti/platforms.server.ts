// Learning platforms registered for LTI 1.3 launches, entered by an admin. Each change is audited.
import { UniqueConstraintError } from "sequelize";
import { LtiPlatform } from "../db/lti.server";
import { sequelize, type User } from "../db/models.server";
import { recordAudit } from "../audit.server";
import { isLoopback } from "../config.server";

export type FieldErrors = Partial<Record<"name" | "issuer" | "clientId" | "loginUrl" | "keySetUrl" | "tokenUrl" | "deploymentIds" | "form", string>>;

export interface PlatformInput {
  name: unknown;
  issuer: unknown;
  clientId: unknown;
  loginUrl: unknown;
  keySetUrl: unknown;
  tokenUrl: unknown;
  deploymentIds: unknown;
}

function httpsUrl(raw: string, what: string): string | null {
  let url: URL;
  try {
    url = new URL(raw);
  } catch {
    return `${what} is not an address: write it as https://host/path.`;
  }
  if (url.protocol !== "https:" && !(url.protocol === "http:" && isLoopback(url.hostname))) return `${what} must start with https:// (plain http only for a platform on this machine).`;
  return null;
}

export function checkPlatformInput(input: PlatformInput) {
  const text = (v: unknown) => String(v ?? "").trim();
  const values = {
    name: text(input.name),
    issuer: text(input.issuer),
    clientId: text(input.clientId),
    loginUrl: text(input.loginUrl),
    keySetUrl: text(input.keySetUrl),
    tokenUrl: text(input.tokenUrl),
    deploymentIds: [...new Set(text(input.deploymentIds).split(/[\s,]+/).filter(Boolean))],
  };
  const errors: FieldErrors = {};
  if (!values.name) errors.name = "Enter the platform's name, as admins and instructors know it.";
  else if (values.name.length > 120) errors.name = "Use at most 120 characters.";
  if (!values.issuer) errors.issuer = "Enter the platform's issuer (the iss of its launches).";
  else errors.issuer = httpsUrl(values.issuer, "The issuer") ?? undefined;
  if (!values.clientId) errors.clientId = "Enter the client id the platform gave Ratebook.";
  else if (values.clientId.length > 255) errors.clientId = "Use at most 255 characters.";
  errors.loginUrl = values.loginUrl ? httpsUrl(values.loginUrl, "The authentication address") ?? undefined : "Enter the platform's OIDC authentication address.";
  errors.keySetUrl = values.keySetUrl ? httpsUrl(values.keySetUrl, "The key set address") ?? undefined : "Enter the address of the platform's public key set (JWKS).";
  if (values.tokenUrl) errors.tokenUrl = httpsUrl(values.tokenUrl, "The token address") ?? undefined;
  if (values.deploymentIds.length === 0) errors.deploymentIds = "Enter at least one deployment id (separate several with spaces or commas).";
  else if (values.deploymentIds.some((d) => d.length > 255)) errors.deploymentIds = "A deployment id has at most 255 characters.";
  for (const k of Object.keys(errors) as (keyof FieldErrors)[]) if (!errors[k]) delete errors[k];
  return { values, errors };
}

export async function registerPlatform(actor: User, input: PlatformInput): Promise<{ ok: true; platform: LtiPlatform } | { ok: false; errors: FieldErrors; values: Record<string, string> }> {
  const { values, errors } = checkPlatformInput(input);
  const echo = { ...values, deploymentIds: values.deploymentIds.join(" ") };
  if (Object.keys(errors).length) return { ok: false, errors, values: echo };
  try {
    const platform = await sequelize.transaction(async (transaction) => {
      const p = await LtiPlatform.create(
        { name: values.name, issuer: values.issuer, clientId: values.clientId, loginUrl: values.loginUrl, keySetUrl: values.keySetUrl, tokenUrl: values.tokenUrl || null, deploymentIds: values.deploymentIds, createdById: actor.id },
        { transaction },
      );
      await recordAudit({ actorId: actor.id, action: "lti-platform.registered", entityType: "lti_platform", entityId: p.id, after: { ...values } }, transaction);
      return p;
    });
    return { ok: true, platform };
  } catch (error) {
    if (error instanceof UniqueConstraintError) {
      return { ok: false, errors: { clientId: `${values.issuer} is already registered with client id ${values.clientId}.` }, values: echo };
    }
    throw error;
  }
}

export async function removePlatform(actor: User, platformId: number): Promise<boolean> {
  return sequelize.transaction(async (transaction) => {
    const p = await LtiPlatform.findByPk(platformId, { transaction });
    if (!p) return false;
    await p.destroy({ transaction });
    await recordAudit({ actorId: actor.id, action: "lti-platform.removed", entityType: "lti_platform", entityId: platformId, before: { name: p.name, issuer: p.issuer, clientId: p.clientId } }, transaction);
    return true;
  });
}

export function listPlatforms() {
  return LtiPlatform.findAll({ order: [["name", "ASC"], ["id", "ASC"]] });
}
