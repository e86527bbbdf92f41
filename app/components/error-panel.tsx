import { isRouteErrorResponse, useRouteLoaderData } from "react-router";

/** Turns whatever a route threw into words a person can act on (404, 403, 401, 500). */
export function describeError(error: unknown): { status: number; title: string; detail: string } {
  let status = 500;
  let title = "Something went wrong";
  let detail = "Ratebook hit an unexpected problem. Nothing you saved is lost; try again, and tell your administrator if it keeps happening.";
  if (isRouteErrorResponse(error)) {
    status = error.status;
    const message = typeof error.data === "object" && error.data && "message" in error.data ? String(error.data.message) : null;
    const byStatus: Record<number, [string, string]> = {
      404: ["Page not found", "There is no page at this address. Check the link, or go back to your dashboard."],
      403: ["Not allowed", "Your account does not have access to this page."],
      401: ["Please sign in", "Sign in to see this page."],
    };
    const known = byStatus[status];
    if (known) [title, detail] = known;
    detail = message ?? detail;
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
  }
  return { status, title, detail };
}

export function ErrorPanel({ error, signedIn }: { error: unknown; signedIn: boolean }) {
  const { status, title, detail } = describeError(error);
  const requestId = (useRouteLoaderData("root") as { requestId?: string | null } | undefined)?.requestId;
  return (
    <div className="mx-auto max-w-xl py-8">
      <p className="text-sm text-ink-soft">Ratebook · error {status}</p>
      <h1 className="mt-2 text-3xl font-bold">{title}</h1>
      <p className="mt-4 text-lg">{detail}</p>
      <p className="mt-6 flex gap-4">
        <a className="text-accent underline" href="/dashboard">Go to your dashboard</a>
        {signedIn ? null : <a className="text-accent underline" href="/sign-in">Sign in</a>}
      </p>
      {requestId ? (
        <p className="mt-6 text-sm text-ink-soft">
          Reference for your administrator: <code className="break-all">{requestId}</code>
        </p>
      ) : null}
      {import.meta.env.DEV && error instanceof Error && error.stack ? <pre className="mt-6 overflow-auto text-xs">{error.stack}</pre> : null}
    </div>
  );
}
