// A refused launch is shown on /lti/problem. The launch and login addresses are resource routes
// (the platform posts to them from its own origin, which page actions refuse), so they hand the
// reason to the page in a short-lived signed cookie and redirect.
import { createCookie, redirect } from "react-router";
import { config } from "../config.server";
import type { LaunchProblemKind } from "./launch.server";

export interface LaunchProblem {
  kind: LaunchProblemKind;
  message: string;
  status: number;
}

export const ltiProblemCookie = createCookie("__ratebook_lti_problem", {
  httpOnly: true,
  sameSite: "lax",
  secure: config.secureCookies,
  path: "/lti",
  secrets: config.sessionSecrets,
  maxAge: 120,
});

export async function toProblemPage(problem: LaunchProblem, extraCookies: string[] = []) {
  const headers = new Headers();
  headers.append("Set-Cookie", await ltiProblemCookie.serialize(problem));
  for (const c of extraCookies) headers.append("Set-Cookie", c);
  return redirect("/lti/problem", { status: 303, headers });
}

export async function problemOf(request: Request): Promise<LaunchProblem | null> {
  const value = await ltiProblemCookie.parse(request.headers.get("Cookie"));
  if (!value || typeof value !== "object" || typeof (value as LaunchProblem).message !== "string") return null;
  return value as LaunchProblem;
}
