// The account page's API tokens: make one (shown once), see which work, revoke them.
import { Form } from "react-router";
import { Button, Field, FormMessage, SelectField } from "./form";

export interface TokenRow {
  id: number;
  name: string;
  tokenStart: string;
  created: string;
  expires: string | null;
  lastUsed: string | null;
  state: "live" | "expired" | "revoked";
}

const EXPIRY_CHOICES = ["30", "7", "90", "365", ""] as const;
const EXPIRY_LABELS: Record<string, string> = { "7": "in 7 days", "30": "in 30 days", "90": "in 90 days", "365": "in a year", "": "never" };
const STATE_TEXT = { live: "works", expired: "expired", revoked: "revoked" } as const;

export function ApiTokensSection(props: {
  tokens: TokenRow[];
  newToken?: { name: string; token: string; expires: string | null };
  errors: Record<string, string | undefined>;
  notice?: string;
  busy: boolean;
}) {
  const { tokens, newToken, errors, notice } = props;
  return (
    <section aria-labelledby="tokens-h" className="mt-10">
      <h2 id="tokens-h" className="mb-1 text-xl font-bold">API tokens</h2>
      <p className="mb-3 text-ink-soft">
        A token lets a script call Ratebook's JSON API as you, with <code>Authorization: Bearer</code> followed by the token.
        It reaches exactly what you can see here. Revoke it when the script no longer needs it.
      </p>
      {newToken ? (
        <div role="status" className="mb-4 rounded border-l-4 border-accent bg-accent-soft px-4 py-3">
          <p className="font-bold">Your new token “{newToken.name}”{newToken.expires ? `, valid until ${newToken.expires}` : ", with no expiry"}:</p>
          <p className="my-2 break-all rounded border border-rule bg-white px-2 py-1 font-mono text-sm" data-testid="new-token">{newToken.token}</p>
          <p className="text-sm">Copy it now: it is shown only this once, and Ratebook keeps only a fingerprint of it.</p>
        </div>
      ) : null}
      {notice ? <FormMessage tone="info">{notice}</FormMessage> : null}
      {errors.form ? <FormMessage tone="error">{errors.form}</FormMessage> : null}
      <Form method="post" noValidate className="mb-4 max-w-lg">
        <input type="hidden" name="intent" value="create-token" />
        <Field label="Token name" name="tokenName" maxLength={80} hint="What the token is for, e.g. “marks export script”." error={errors.name} />
        <SelectField label="Expires" name="expiresInDays" options={EXPIRY_CHOICES} labels={EXPIRY_LABELS} defaultValue="30" error={errors.expiresInDays} />
        <Button busy={props.busy}>Make a token</Button>
      </Form>
      {tokens.length ? (
        <ul className="divide-y divide-rule rounded border border-rule bg-white">
          {tokens.map((t) => (
            <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 px-4 py-3">
              <div>
                <p className="font-bold">
                  {t.name} <span className="font-mono text-sm font-normal">{t.tokenStart}…</span> · {STATE_TEXT[t.state]}
                </p>
                <p className="text-sm text-ink-soft">
                  Made {t.created}; {t.expires ? `expires ${t.expires}` : "no expiry"}; {t.lastUsed ? `last used ${t.lastUsed}` : "not used yet"}
                </p>
              </div>
              {t.state === "live" ? (
                <Form method="post">
                  <input type="hidden" name="intent" value="revoke-token" />
                  <input type="hidden" name="tokenId" value={t.id} />
                  <button type="submit" className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft" aria-label={`Revoke the token ${t.name}`}>
                    Revoke
                  </button>
                </Form>
              ) : null}
            </li>
          ))}
        </ul>
      ) : (
        <p className="text-ink-soft">You have no API tokens yet.</p>
      )}
    </section>
  );
}
