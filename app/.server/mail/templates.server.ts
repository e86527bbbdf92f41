// Every e-mail Ratebook sends, in one place: a template is a name, the data it needs (checked
// with zod when the job runs, since jobs outlive deploys) and the subject and body made from
// it. Text that people typed (names, titles, course codes) goes through `inline()`, so a title
// with a line break or a direction override cannot add lines to a body or a header.
import { z } from "zod";
import { config } from "../config.server";
import { groupLabel, upperFirst } from "../../lib/natural-order";

/** One line of plain text: controls, line breaks, zero-width and direction marks become spaces. */
export function inline(text: string, max = 200): string {
  const flat = text
    .replace(/[\u0000-\u001f\u007f-\u009f\u00ad\u061c\u180e\u200b-\u200f\u2028-\u202e\u2060-\u206f\ufeff]/gu, " ")
    .replace(/\s+/gu, " ")
    .trim();
  return flat.length > max ? `${flat.slice(0, max - 1)}…` : flat;
}

const name = z.string().max(400);
const id = z.number().int().positive();

const TEMPLATES = {
  invitation: {
    data: z.object({ name, inviter: name, courseCode: name, courseTitle: name, role: name, token: z.string().min(20).max(200) }),
    render: (d: { name: string; inviter: string; courseCode: string; courseTitle: string; role: string; token: string }) => ({
      subject: `You are invited to ${inline(d.courseCode)} on Ratebook`,
      text:
        `Hello ${inline(d.name)},\n\n${inline(d.inviter)} has added you to ${inline(d.courseCode)} ${inline(d.courseTitle)} as ${inline(d.role)}.\n` +
        `Choose your password here (the link works once and for 7 days):\n\n${config.appUrl}/invitation/${d.token}\n\n` +
        `If you did not expect this, ignore this message.\n`,
    }),
  },
  "course-invitation": {
    // an existing account: nothing changes until its owner accepts on their dashboard
    data: z.object({ name, inviter: name, courseCode: name, courseTitle: name, role: name }),
    render: (d: { name: string; inviter: string; courseCode: string; courseTitle: string; role: string }) => ({
      subject: `Invitation to join ${inline(d.courseCode)} on Ratebook`,
      text:
        `Hello ${inline(d.name)},\n\n${inline(d.inviter)} invites you to join ${inline(d.courseCode)} ${inline(d.courseTitle)} as ${inline(d.role)}.\n` +
        `Sign in with your usual password and accept or decline on your dashboard:\n\n${config.appUrl}/dashboard\n\n` +
        `Nothing changes in your account until you accept.\n`,
    }),
  },
  "password-reset": {
    data: z.object({ name, token: z.string().min(20).max(200) }),
    render: (d: { name: string; token: string }) => ({
      subject: "Reset your Ratebook password",
      text:
        `Hello ${inline(d.name)},\n\nSomeone asked to reset the password of this Ratebook account.\n` +
        `Choose a new password here (the link works once and for one hour):\n\n${config.appUrl}/password/reset/${d.token}\n\n` +
        `If it was not you, ignore this message: your password stays as it is.\n`,
    }),
  },
  "bench-notice": {
    // groupId is optional: jobs queued before the upload link was added still render
    data: z.object({ name, group: name, practical: name, date: z.string().max(40), bench: name, sessionId: id, benchId: id, groupId: id.optional(), deadlineUtc: z.string().max(40).nullable(), deadlineShown: z.string().max(60).optional() }),
    // deadlineShown: the deadline on the course's clock with its zone ("Thu, 10 Dec 2026, 17:00 CET"); older jobs carry only deadlineUtc
    render: (d: { name: string; group: string; practical: string; date: string; bench: string; sessionId: number; benchId: number; groupId?: number; deadlineUtc: string | null; deadlineShown?: string }) => ({
      subject: `Your bench for ${inline(d.practical)} on ${inline(d.date)}: bench ${inline(d.bench)}`,
      text:
        `Hello ${inline(d.name)},\n\n${upperFirst(groupLabel(inline(d.group)))} works at bench ${inline(d.bench)} in ${inline(d.practical)} on ${inline(d.date)}.\n` +
        `Your bench sheet (feed, temperature, volumes to mix, sampling plan and hazard cautions):\n\n` +
        `${config.appUrl}/sessions/${d.sessionId}/benches/${d.benchId}/sheet\n\n` +
        (d.deadlineShown ? `Upload your readings by ${inline(d.deadlineShown)}.\n` : d.deadlineUtc ? `Upload your readings by ${inline(d.deadlineUtc)} UTC.\n` : "") +
        (d.groupId ? `Upload your readings here:\n\n${config.appUrl}/groups/${d.groupId}/submissions\n` : ""),
    }),
  },
  "marks-released": {
    data: z.object({ name, practical: name, group: name, groupId: id }),
    render: (d: { name: string; practical: string; group: string; groupId: number }) => ({
      subject: `Marks released: ${inline(d.practical)}`,
      text: `Hello ${inline(d.name)},\n\nThe marks and feedback for "${inline(d.practical)}" (${groupLabel(inline(d.group))}) are ready.\nRead them at ${config.appUrl}/groups/${d.groupId}/submissions\n\nRatebook`,
    }),
  },
} as const;

export type MailTemplate = keyof typeof TEMPLATES;
export type MailData<T extends MailTemplate> = Parameters<(typeof TEMPLATES)[T]["render"]>[0];
export const MAIL_TEMPLATES = Object.keys(TEMPLATES) as MailTemplate[];

export type Rendered = { ok: true; subject: string; text: string } | { ok: false; message: string };

/** Subject and body of a template, or why its data will not do. */
export function renderMail(template: string, data: unknown): Rendered {
  const t = (TEMPLATES as Record<string, { data: z.ZodType; render: (d: never) => { subject: string; text: string } }>)[template];
  if (!t) return { ok: false, message: `there is no mail template "${template}"` };
  const parsed = t.data.safeParse(data);
  if (!parsed.success) return { ok: false, message: `data for mail template "${template}" do not fit: ${parsed.error.message}` };
  return { ok: true, ...t.render(parsed.data as never) };
}
