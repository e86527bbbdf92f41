import { Form, NavLink, Outlet, useRouteLoaderData } from "react-router";
import type { ReactNode } from "react";
import type { Route } from "./+types/signed-in-layout";
import { isCourseStaffSomewhere, requireUser } from "~/.server/guards.server";
import { ROLE_LABELS } from "~/.server/db/models.server";
import { navFor } from "~/lib/navigation";
import { ErrorPanel } from "~/components/error-panel";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return {
    user: { displayName: user.displayName, email: user.email, role: user.role, roleLabel: ROLE_LABELS[user.role] },
    nav: navFor(user.role, await isCourseStaffSomewhere(user)),
  };
}

type LayoutData = Awaited<ReturnType<typeof loader>>;

function Shell({ data, children }: { data: LayoutData; children: ReactNode }) {
  const { user, nav } = data;
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
              <NavLink to="/account" className="font-bold underline-offset-4 hover:underline" title="Your account">{user.displayName}</NavLink>{" "}
              <span className="rounded border border-ink-soft px-2 py-0.5 whitespace-nowrap text-ink-soft" title="Account type">{user.roleLabel}</span>
            </span>
            <Form method="post" action="/sign-out">
              <button type="submit" className="rounded border border-ink-soft px-3 py-1 hover:bg-accent-soft">Sign out</button>
            </Form>
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 py-8">{children}</main>
    </div>
  );
}

export default function SignedInLayout({ loaderData }: Route.ComponentProps) {
  return (
    <Shell data={loaderData}>
      <Outlet />
    </Shell>
  );
}

// A page below the layout failed (403, 404, 500): keep the header so people can move on.
export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const data = useRouteLoaderData<LayoutData>("routes/signed-in-layout");
  if (!data) return <main className="px-4"><ErrorPanel error={error} signedIn={false} /></main>;
  return (
    <Shell data={data}>
      <ErrorPanel error={error} signedIn />
    </Shell>
  );
}
