// A local fake of an institution's sign-in service for the demo and the tests: a real OpenID
// provider (oidc-provider 9, a certified implementation) on loopback, with invented people and a
// small sign-in page of our own. Nothing here is used in production, where OIDC_ISSUER names the
// institution's own provider.
import crypto from "node:crypto";
import http from "node:http";
import Provider, { type Configuration } from "oidc-provider";

export interface FakeInstitutionPerson {
  /** the institution's stable id for the person (the token's `sub`) */
  sub: string;
  /** what the person types on the fake's sign-in page */
  username: string;
  password: string;
  name: string;
  email: string;
  email_verified: boolean;
  /** the institution's student number, matched against the roster's column when the e-mail does not match */
  student_number?: string;
}

/** Invented people (demo data). The first two match the demo's seeded students by e-mail. */
export const FAKE_INSTITUTION_PEOPLE: FakeInstitutionPerson[] = [
  { sub: "fi-0001", username: "sam", password: "institution-pass", name: "Sam Lindqvist (demo student)", email: "student@demo.ratebook.invalid", email_verified: true, student_number: "D0000001" },
  { sub: "fi-0002", username: "ari", password: "institution-pass", name: "Ari Novak (demo student)", email: "student2@demo.ratebook.invalid", email_verified: true, student_number: "D0000002" },
  { sub: "fi-0003", username: "rowan", password: "institution-pass", name: "Dr Rowan Vale (demo instructor)", email: "instructor@demo.ratebook.invalid", email_verified: true },
  // The institution's address differs from the one on the roster; the student number links them
  // (the demo leaves that roster column empty; the tests fill it in).
  { sub: "fi-0004", username: "cam", password: "institution-pass", name: "Cam Osei (demo student)", email: "c.osei@fake-institution.invalid", email_verified: true, student_number: "D0000004" },
  // Someone the institution knows and Ratebook does not: gets the "no account" page.
  { sub: "fi-0090", username: "visitor", password: "institution-pass", name: "Vic Stranger (invented)", email: "visitor@fake-institution.invalid", email_verified: true },
  // The e-mail matches a demo student but the institution has not verified it: never linked by it.
  { sub: "fi-0091", username: "unverified", password: "institution-pass", name: "Una Checked (invented)", email: "student3@demo.ratebook.invalid", email_verified: false },
];

export interface FakeInstitutionClient {
  client_id: string;
  client_secret: string;
  redirect_uris: string[];
}

export interface FakeInstitution {
  issuer: string;
  port: number;
  people: FakeInstitutionPerson[];
  close(): Promise<void>;
}

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function page(title: string, body: string) {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escape(title)}</title>
<style>body{font-family:sans-serif;max-width:26rem;margin:3rem auto;padding:0 1rem}label{display:block;margin-top:1rem}
input{display:block;width:100%;padding:.4rem}button{margin-top:1.2rem;padding:.5rem 1rem}.error{color:#a00}</style></head>
<body><p><strong>Fake Institution</strong> (a local test service with invented people)</p>${body}</body></html>`;
}

function loginPage(uid: string, clientId: string, error?: string) {
  return page(
    "Fake Institution sign-in",
    `<h1>Sign in</h1><p>to continue to ${escape(clientId)}</p>${error ? `<p class="error" role="alert">${escape(error)}</p>` : ""}
<form method="post" action="/interaction/${escape(uid)}/login">
<label for="username">Username</label><input id="username" name="username" autocomplete="username" required>
<label for="password">Password</label><input id="password" name="password" type="password" autocomplete="current-password" required>
<button type="submit">Continue</button></form>`,
  );
}

async function formBody(req: http.IncomingMessage): Promise<URLSearchParams> {
  let raw = "";
  for await (const chunk of req) {
    raw += chunk;
    if (raw.length > 10_000) break;
  }
  return new URLSearchParams(raw);
}

/**
 * Starts the fake on 127.0.0.1:`port`. Each client is registered as a confidential client
 * (client_secret_basic) that must use PKCE.
 */
export async function startFakeInstitution(opts: {
  port: number;
  clients: FakeInstitutionClient[];
  people?: FakeInstitutionPerson[];
}): Promise<FakeInstitution> {
  const people = opts.people ?? FAKE_INSTITUTION_PEOPLE;
  const issuer = `http://127.0.0.1:${opts.port}`;
  const bySub = new Map(people.map((p) => [p.sub, p]));

  const configuration: Configuration = {
    clients: opts.clients.map((c) => ({ ...c, grant_types: ["authorization_code"], response_types: ["code"], token_endpoint_auth_method: "client_secret_basic" })),
    // PKCE on every authorisation request, so a wrong verifier is refused by the provider itself.
    pkce: { required: () => true },
    claims: { openid: ["sub"], email: ["email", "email_verified"], profile: ["name", "student_number"] },
    scopes: ["openid", "email", "profile"],
    features: { devInteractions: { enabled: false } },
    // Cookie keys and signing keys are made per run: nothing from the fake outlives it.
    cookies: { keys: [crypto.randomBytes(32).toString("hex")] },
    jwks: { keys: [{ ...crypto.generateKeyPairSync("rsa", { modulusLength: 2048 }).privateKey.export({ format: "jwk" }), kid: `fake-${Date.now()}`, use: "sig", alg: "RS256" }] as never },
    ttl: { Interaction: 600, Session: 3600, Grant: 3600, AuthorizationCode: 60, AccessToken: 600, IdToken: 600 },
    interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
    async findAccount(_ctx, sub) {
      const person = bySub.get(sub);
      if (!person) return undefined;
      return {
        accountId: sub,
        async claims() {
          const { sub: s, name, email, email_verified, student_number } = person;
          return { sub: s, name, email, email_verified, ...(student_number ? { student_number } : {}) };
        },
      };
    },
    // A first-party fake: grant the requested scopes without a consent screen.
    async loadExistingGrant(ctx) {
      const oidc = ctx.oidc;
      const clientId = oidc.client!.clientId;
      const grantId = oidc.result?.consent?.grantId ?? oidc.session!.grantIdFor(clientId);
      if (grantId) {
        const existing = await oidc.provider.Grant.find(grantId);
        if (existing) return existing;
      }
      const grant = new oidc.provider.Grant({ clientId, accountId: oidc.session!.accountId });
      grant.addOIDCScope("openid email profile");
      await grant.save();
      return grant;
    },
    renderError(ctx, out) {
      ctx.type = "html";
      ctx.body = page("Fake Institution error", `<h1>Sign-in error</h1><p>${escape(String(out.error))}: ${escape(String(out.error_description ?? ""))}</p>`);
    },
  };
  const provider = new Provider(issuer, configuration);
  // Errors are answered to the client; keep the fake quiet in test output.
  provider.on("server_error", (_ctx, error) => console.error("[fake-institution]", error));
  const providerCallback = provider.callback();

  const server = http.createServer(async (req, res) => {
    const url = new URL(req.url ?? "/", issuer);
    const m = url.pathname.match(/^\/interaction\/([\w-]+)(\/login)?$/);
    if (!m) return providerCallback(req, res);
    try {
      const details = await provider.interactionDetails(req, res);
      const clientId = String(details.params.client_id ?? "");
      if (req.method === "GET") {
        res.writeHead(200, { "content-type": "text/html; charset=utf-8" }).end(loginPage(details.uid, clientId));
        return;
      }
      if (req.method === "POST" && m[2]) {
        const form = await formBody(req);
        const person = people.find((p) => p.username === form.get("username"));
        const given = Buffer.from(String(form.get("password") ?? ""));
        const expected = Buffer.from(person?.password ?? "");
        if (!person || given.length !== expected.length || !crypto.timingSafeEqual(given, expected)) {
          res.writeHead(200, { "content-type": "text/html; charset=utf-8" }).end(loginPage(details.uid, clientId, "Unknown username or wrong password."));
          return;
        }
        await provider.interactionFinished(req, res, { login: { accountId: person.sub } }, { mergeWithLastSubmission: false });
        return;
      }
      res.writeHead(405).end();
    } catch (error) {
      res.writeHead(400, { "content-type": "text/html; charset=utf-8" }).end(page("Fake Institution error", `<h1>Sign-in error</h1><p>${escape((error as Error).message)}</p>`));
    }
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  return {
    issuer,
    port: opts.port,
    people,
    close: () => new Promise<void>((resolve) => {
      server.closeAllConnections();
      server.close(() => resolve());
    }),
  };
}
