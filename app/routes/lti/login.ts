// LTI 1.3 login initiation: the platform sends the browser here (GET or form POST); Ratebook
// answers with the platform's authentication request (app/.server/lti/launch.server.ts).
import { redirect } from "react-router";
import type { Route } from "./+types/login";
import { initiateLogin, LaunchRefused } from "~/.server/lti/launch.server";
import { toProblemPage } from "~/.server/lti/problem.server";
import { readForm } from "~/.server/body.server";

async function answer(params: URLSearchParams | FormData) {
  try {
    const { redirectTo, setCookie } = await initiateLogin(params);
    return redirect(redirectTo, { status: 302, headers: { "Set-Cookie": setCookie } });
  } catch (error) {
    if (error instanceof LaunchRefused) return toProblemPage({ kind: error.kind, message: error.message, status: error.status });
    throw error;
  }
}

export function loader({ request }: Route.LoaderArgs) {
  return answer(new URL(request.url).searchParams);
}

export async function action({ request }: Route.ActionArgs) {
  return answer(await readForm(request));
}
