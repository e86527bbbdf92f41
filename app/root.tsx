import { Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import type { Route } from "./+types/root";
import { ErrorPanel } from "./components/error-panel";
import { withSecurityHeaders } from "./.server/security-headers.server";
import "./app.css";

// Every answer the app makes (pages, data requests, the JSON API, redirects) gets the security headers.
export const middleware: Route.MiddlewareFunction[] = [async (_args, next) => withSecurityHeaders(await next())];

// The request id (set by the production server) travels with every document and data request,
// so an error page can name the request whose log lines tell what happened.
export function loader({ request }: Route.LoaderArgs) {
  return { requestId: request.headers.get("x-request-id") };
}

export const meta: Route.MetaFunction = () => [{ title: "Ratebook" }];

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

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
  return (
    <main className="px-4">
      <ErrorPanel error={error} signedIn={false} />
    </main>
  );
}
