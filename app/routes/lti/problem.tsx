// Why a launch from a learning platform was refused (app/.server/lti/problem.server.ts).
import { data, Link } from "react-router";
import type { Route } from "./+types/problem";
import { problemOf } from "~/.server/lti/problem.server";
import { FormMessage } from "~/components/form";
import { NarrowPage } from "~/components/page";

export const meta: Route.MetaFunction = () => [{ title: "Launch refused · Ratebook" }];

export async function loader({ request }: Route.LoaderArgs) {
  const problem = await problemOf(request);
  if (!problem) return data({ kind: null, message: "There is no refused launch to show (the explanation lasts two minutes). Open Ratebook from your learning platform again." }, { status: 404 });
  return data({ kind: problem.kind, message: problem.message }, { status: problem.status });
}

export default function LaunchProblem({ loaderData }: Route.ComponentProps) {
  return (
    <NarrowPage title="Launch refused">
      <FormMessage tone="error">{loaderData.message}</FormMessage>
      <p>
        If this keeps happening, tell your instructor or the platform's administrator what the message says. You can also{" "}
        <Link className="text-accent underline" to="/sign-in">sign in to Ratebook directly</Link>.
      </p>
    </NarrowPage>
  );
}
