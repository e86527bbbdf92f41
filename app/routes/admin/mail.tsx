import type { Route } from "./+types/mail";
import { requireUser } from "~/.server/guards.server";
import { listSinkMessages } from "~/.server/mail.server";
import { FormMessage } from "~/components/form";
import { PageTitle } from "~/components/page";
import { trailFor } from "~/lib/place";

export const meta: Route.MetaFunction = () => [{ title: "Sent mail · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request, { roles: ["admin"] });
  try {
    const messages = await listSinkMessages();
    return { configured: messages !== null, messages: (messages ?? []).slice().reverse(), problem: null };
  } catch (error) {
    return { configured: true, messages: [], problem: `The local mail sink did not answer (${(error as Error).message}).` };
  }
}

const URL_PATTERN = /(https?:\/\/[^\s<>"]+)/g;

/** Addresses in a message become links, so a demo invitation or reset can be followed from here. */
function withLinks(text: string) {
  return text.split(URL_PATTERN).map((part, i) =>
    i % 2 === 1 ? <a key={i} href={part} className="break-all text-accent underline">{part}</a> : part,
  );
}

export default function AdminMail({ loaderData }: Route.ComponentProps) {
  const { configured, messages, problem } = loaderData;
  return (
    <>
      <PageTitle trail={trailFor("Sent mail")} sub="Messages caught by the local mail sink, newest first. In production, mail goes to the SMTP server and is not listed here.">Sent mail</PageTitle>
      {!configured ? <FormMessage tone="info">Mail goes to a real SMTP server (SMTP_URL is set), so there is nothing to show here.</FormMessage> : null}
      {problem ? <FormMessage tone="error">{problem}</FormMessage> : null}
      {configured && !problem && messages.length === 0 ? <p className="text-ink-soft">No messages yet. Invite someone to a course to see one here.</p> : null}
      <ol className="space-y-4">
        {messages.map((m) => (
          <li key={m.id} className="rounded border border-rule bg-white p-4">
            <p className="text-sm text-ink-soft">{new Date(m.receivedAt).toISOString().replace("T", " ").slice(0, 19)} UTC · to {m.to.join(", ")}</p>
            <h2 className="mt-1 text-lg font-bold">{m.subject}</h2>
            <pre className="mt-2 font-sans whitespace-pre-wrap break-words">{withLinks(m.text)}</pre>
          </li>
        ))}
      </ol>
    </>
  );
}
