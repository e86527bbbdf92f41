// Walks the fake institution's sign-in over plain HTTP, as a browser would: follows the
// provider's redirects with its cookies, posts the sign-in form and stops at the redirect back
// to Ratebook, whose address it returns (with `code` and `state`, or an `error`).
export async function signInAtFakeInstitution(authorizationUrl: string, username: string, password: string, appOrigin: string): Promise<URL> {
  const jar = new Map<string, string>();
  const cookieHeader = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const keep = (res: Response) => {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(";");
      const eq = pair.indexOf("=");
      jar.set(pair.slice(0, eq).trim(), pair.slice(eq + 1));
    }
  };
  let url = new URL(authorizationUrl);
  let init: RequestInit = {};
  for (let hop = 0; hop < 12; hop++) {
    const res = await fetch(url, { ...init, redirect: "manual", headers: { ...(init.headers ?? {}), cookie: cookieHeader() } });
    keep(res);
    init = {};
    const location = res.headers.get("location");
    if (res.status >= 300 && res.status < 400 && location) {
      url = new URL(location, url);
      if (url.origin === appOrigin) return url;
      continue;
    }
    const html = await res.text();
    const action = html.match(/<form method="post" action="([^"]+)"/)?.[1];
    if (res.status !== 200 || !action) throw new Error(`the fake institution answered ${res.status} at ${url}:\n${html.slice(0, 500)}`);
    if (html.includes('role="alert"')) throw new Error(`the fake institution refused the sign-in: ${html.match(/role="alert">([^<]*)/)?.[1]}`);
    url = new URL(action, url);
    init = {
      method: "POST",
      body: new URLSearchParams({ username, password }).toString(),
      headers: { "content-type": "application/x-www-form-urlencoded" },
    };
  }
  throw new Error("too many redirects at the fake institution");
}
