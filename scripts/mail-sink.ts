// `npm run mail` : runs the local mail sink on its own (npm start runs it too).
import path from "node:path";
import { startMailSink } from "./lib/mail-sink";
import { projectRoot } from "./lib/postgres";

const smtpPort = Number(process.env.MAIL_SINK_SMTP_PORT ?? 2525);
const httpPort = Number(process.env.MAIL_SINK_HTTP_PORT ?? 2526);
await startMailSink({ smtpPort, httpPort, file: path.join(projectRoot, ".data", "mail", "messages.jsonl") });
console.log(`[mail] local mail sink: SMTP on 127.0.0.1:${smtpPort}, messages at http://127.0.0.1:${httpPort}/messages`);
