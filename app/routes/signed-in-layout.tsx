import { Form, NavLink, Outlet } from "react-router";
import type { Route } from "./+types/signed-in-layout";
import { requireUser } from "~/.server/guards.server";
import { navFor } from "~/lib/navigation";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { user: { displayName: user.displayName, email: user.email, role: user.role }, nav: navFor(user.role) };
}

export default function SignedInLayout({ loaderData }: Route.ComponentProps) {
  const { user, nav } = loaderData;
  return (
    <div className="min-h-screen">
      <header className="no-print border-b border-rule bg-white">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
          <a href="/dashboard" className="text-xl font-bold tracking-tight text-accent">Ratebook</a>
          <nav aria-label="Main" className="flex flex-wrap gap-1">
            {nav.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                end
                className={({ isActive }) =>
                  `rounded px-3 py-1 ${isActive ? "bg-accent-soft font-bold underline decoration-2 underline-offset-4" : "hover:bg-accent-soft"}`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="ml-auto flex items-center gap-3 text-sm">
            <span>
              <span className="font-bold">{user.displayName}</span>{" "}
              <span className="rounded border border-ink-soft px-2 py-0.5 text-ink-soft">{user.role}</span>
            </span>
            <Form method="post" action="/sign-out">
              <button type="submit" className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft">Sign out</button>
            </Form>
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 py-8">
        <Outlet />
      </main>
    </div>
  );
}
