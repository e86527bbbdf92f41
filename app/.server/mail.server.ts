import nodemailer, { type Transporter } from "nodemailer";
import { config } from "./config.server";
import type { MailMessage } from "~/lib/mail-message";

let transport: Transporter | null = null;

function getTransport() {
  transport ??= nodemailer.createTransport(config.smtpUrl);
  return transport;
}

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
}

export async function sendMail(mail: OutgoingMail) {
  await getTransport().sendMail({ from: config.mailFrom, ...mail });
}


/** Messages held by the local mail sink (development and tests only). */
export async function listSinkMessages(): Promise<MailMessage[] | null> {
  if (!config.mailSinkUrl) return null;
  const res = await fetch(`${config.mailSinkUrl}/messages`);
  if (!res.ok) throw new Error(`mail sink answered ${res.status}`);
  return (await res.json()) as MailMessage[];
}
