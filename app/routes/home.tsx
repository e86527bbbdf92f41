import { redirect } from "react-router";
import type { Route } from "./+types/home";
import { currentUser } from "~/.server/guards.server";

export async function loader({ request }: Route.LoaderArgs) {
  throw redirect((await currentUser(request)) ? "/dashboard" : "/sign-in");
}

export default function Home() {
  return null;
}
