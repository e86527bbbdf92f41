import { isRouteErrorResponse, Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import type { Route } from "./+types/root";
import "./app.css";

export const meta: Route.MetaFunction = () => [{ title: "Ratebook" }];

export function Layout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen">
        {children}
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

export default function App() {
  return <Outlet />;
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let title = "Something went wrong";
  let detail = "Ratebook hit an unexpected problem. Nothing you saved is lost; try again, and tell your administrator if it keeps happening.";
  let status = 500;
  if (isRouteErrorResponse(error)) {
    status = error.status;
    const message = typeof error.data === "object" && error.data && "message" in error.data ? String(error.data.message) : null;
    if (status === 404) {
      title = "Page not found";
      detail = message ?? "There is no page at this address. Check the link, or go back to your dashboard.";
    } else if (status === 403) {
      title = "Not allowed";
      detail = message ?? "Your account does not have access to this page.";
    } else if (status === 401) {
      title = "Please sign in";
      detail = message ?? "Sign in to see this page.";
    } else {
      detail = message ?? detail;
    }
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
  }
  return (
    <main className="mx-auto max-w-xl p-8">
      <p className="text-sm text-ink-soft">Ratebook · error {status}</p>
      <h1 className="mt-2 text-3xl font-bold">{title}</h1>
      <p className="mt-4 text-lg">{detail}</p>
      <p className="mt-6 flex gap-4">
        <a className="text-accent underline" href="/dashboard">Go to your dashboard</a>
        <a className="text-accent underline" href="/sign-in">Sign in</a>
      </p>
      {import.meta.env.DEV && error instanceof Error && error.stack ? (
        <pre className="mt-6 overflow-auto text-xs">{error.stack}</pre>
      ) : null}
    </main>
  );
}
