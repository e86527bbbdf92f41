// LTI 1.3 launch: the platform's form post of the signed ID token. A good launch signs the person
// in and opens the course; any other is refused with a page saying why.
import type { Route } from "./+types/launch";
import { acceptLaunch, LaunchRefused, ltiStateCookie } from "~/.server/lti/launch.server";
import { toProblemPage } from "~/.server/lti/problem.server";
import { startSession } from "~/.server/session.server";
import { readForm } from "~/.server/body.server";

export async function action({ request }: Route.ActionArgs) {
  const form = await readForm(request);
  const clearState = await ltiStateCookie.serialize("", { maxAge: 0 });
  try {
    const launch = await acceptLaunch(form, request.headers.get("Cookie"));
    const res = await startSession(launch.userId, `/courses/${launch.courseId}`, request, "lti");
    res.headers.append("Set-Cookie", clearState);
    // 303: the browser follows the form post with a GET of the course page.
    return new Response(null, { status: 303, headers: res.headers });
  } catch (error) {
    if (error instanceof LaunchRefused) return toProblemPage({ kind: error.kind, message: error.message, status: error.status }, [clearState]);
    throw error;
  }
}

export function loader() {
  return toProblemPage({ kind: "bad-message", message: "A launch is a form post from a learning platform; this address was opened directly.", status: 400 });
}
