import nodemailer, { type Transporter } from "nodemailer";
import { config } from "./config.server";

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

export interface SinkMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
}

/** Messages held by the local mail sink (development and tests only). */
export async function listSinkMessages(): Promise<SinkMessage[] | null> {
  if (!config.mailSinkUrl) return null;
  const res = await fetch(`${config.mailSinkUrl}/messages`);
  if (!res.ok) throw new Error(`mail sink answered ${res.status}`);
  return (await res.json()) as SinkMessage[];
}
