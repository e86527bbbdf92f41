// The only way requests send mail: a `send-mail` job added in the caller's transaction, naming
// a template and its data. The address is checked here with the same function the job uses,
// so a mail reported as queued is one the job will try to send.
import type { Transaction } from "sequelize";
import { emailProblem, normaliseEmail } from "~/lib/email-address";
import { enqueue } from "../jobs/queue.server";
import { renderMail, type MailData, type MailTemplate } from "./templates.server";

export class UnsendableMailError extends Error {}

export async function queueMail<T extends MailTemplate>(to: string, template: T, data: MailData<T>, options: { transaction?: Transaction } = {}): Promise<string> {
  const address = normaliseEmail(to);
  const bad = emailProblem(address, "the recipient's");
  if (bad) throw new UnsendableMailError(`cannot queue mail to ${JSON.stringify(to)}: ${bad}`);
  const rendered = renderMail(template, data);
  if (!rendered.ok) throw new UnsendableMailError(rendered.message);
  return enqueue("send-mail", { to: address, template, data: data as Record<string, unknown> }, options);
}
