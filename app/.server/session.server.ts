import { createCookieSessionStorage, redirect } from "react-router";
import { config } from "./config.server";

if (config.usingDevSecret) {
  console.warn(
    "\n!!! SESSION_SECRET is not set: using the development default, so sessions can be forged.\n" +
      "!!! Set SESSION_SECRET to a long random string before anyone else can reach this server.\n",
  );
}

type SessionData = { userId: number };
type SessionFlash = { notice: string };

export const sessionStorage = createCookieSessionStorage<SessionData, SessionFlash>({
  cookie: {
    name: "__ratebook_session",
    httpOnly: true,
    sameSite: "lax",
    path: "/",
    secure: config.secureCookies,
    secrets: [config.sessionSecret],
    maxAge: 60 * 60 * 12,
  },
});

export function getSession(request: Request) {
  return sessionStorage.getSession(request.headers.get("Cookie"));
}

export async function startSession(userId: number, redirectTo: string) {
  const session = await sessionStorage.getSession();
  session.set("userId", userId);
  return redirect(redirectTo, { headers: { "Set-Cookie": await sessionStorage.commitSession(session) } });
}

export async function endSession(request: Request) {
  const session = await getSession(request);
  return redirect("/sign-in", { headers: { "Set-Cookie": await sessionStorage.destroySession(session) } });
}
