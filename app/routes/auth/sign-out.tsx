import { redirect } from "react-router";
import type { Route } from "./+types/sign-out";
import { endSession } from "~/.server/session.server";
import { requireSameOriginPost } from "~/.server/same-origin.server";

// A resource route (no page): React Router's origin check of page actions does not cover it.
export async function action({ request }: Route.ActionArgs) {
  requireSameOriginPost(request);
  return endSession(request);
}

export function loader() {
  return redirect("/");
}
