// A local fake mail service for development and tests: an SMTP server on loopback that keeps
// every message, and a small HTTP API to read them (GET /messages, DELETE /messages).
// Messages are also appended to a JSON-lines file so they survive a restart.
import fs from "node:fs";
import http from "node:http";
import path from "node:path";
import { SMTPServer } from "smtp-server";
import { simpleParser, type AddressObject } from "mailparser";
import type { MailMessage } from "../../app/lib/mail-message";

export interface MailSink {
  messages: MailMessage[];
  smtpPort: number;
  httpPort: number;
  close(): Promise<void>;
}

function addresses(a: AddressObject | AddressObject[] | undefined): string[] {
  const list = Array.isArray(a) ? a : a ? [a] : [];
  return list.flatMap((x) => x.value.map((v) => v.address ?? "")).filter(Boolean);
}

export async function startMailSink(opts: { smtpPort: number; httpPort: number; file?: string }): Promise<MailSink> {
  const messages: MailMessage[] = [];
  if (opts.file && fs.existsSync(opts.file)) {
    for (const line of fs.readFileSync(opts.file, "utf8").split("\n")) if (line.trim()) messages.push(JSON.parse(line));
  }
  let seq = messages.length;
  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    banner: "Ratebook local mail sink",
    logger: false,
    async onData(stream, session, callback) {
      try {
        const parsed = await simpleParser(stream);
        const msg: MailMessage = {
          id: String(++seq),
          receivedAt: new Date().toISOString(),
          from: addresses(parsed.from)[0] ?? session.envelope.mailFrom?.toString() ?? "",
          to: session.envelope.rcptTo.map((r) => r.address),
          subject: parsed.subject ?? "",
          text: parsed.text ?? "",
        };
        messages.push(msg);
        if (opts.file) {
          fs.mkdirSync(path.dirname(opts.file), { recursive: true });
          fs.appendFileSync(opts.file, JSON.stringify(msg) + "\n");
        }
        callback();
      } catch (error) {
        callback(error as Error);
      }
    },
  });
  const api = http.createServer((req, res) => {
    if (req.url === "/messages" && req.method === "GET") {
      res.writeHead(200, { "content-type": "application/json" });
      res.end(JSON.stringify(messages));
    } else if (req.url === "/messages" && req.method === "DELETE") {
      messages.length = 0;
      if (opts.file && fs.existsSync(opts.file)) fs.writeFileSync(opts.file, "");
      res.writeHead(204).end();
    } else {
      res.writeHead(404, { "content-type": "application/json" }).end(JSON.stringify({ error: "GET or DELETE /messages" }));
    }
  });
  await new Promise<void>((resolve, reject) => {
    smtp.once("error", reject);
    smtp.listen(opts.smtpPort, "127.0.0.1", () => resolve());
  });
  await new Promise<void>((resolve, reject) => {
    api.once("error", reject);
    api.listen(opts.httpPort, "127.0.0.1", () => resolve());
  });
  return {
    messages,
    smtpPort: opts.smtpPort,
    httpPort: opts.httpPort,
    close: () =>
      Promise.all([
        new Promise<void>((r) => smtp.close(() => r())),
        new Promise<void>((r) => api.close(() => r())),
      ]).then(() => undefined),
  };
}
