import { redirect } from "react-router";
import type { Route } from "./+types/sign-out";
import { endSession } from "~/.server/session.server";

export async function action({ request }: Route.ActionArgs) {
  return endSession(request);
}

export function loader() {
  return redirect("/");
}
