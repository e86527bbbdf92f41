// The framework's Node entry, plus a per-response CSP nonce: React Router puts it on its own
// inline scripts (and <Scripts>, <ScrollRestoration>, <Links>) through ServerRouter's `nonce`.
import { PassThrough } from "node:stream";
import type { EntryContext, HandleErrorFunction, RouterContextProvider } from "react-router";
import { createReadableStreamFromReadable } from "@react-router/node";
import { ServerRouter } from "react-router";
import { isbot } from "isbot";
import { renderToPipeableStream, type RenderToPipeableStreamOptions } from "react-dom/server";
import { documentPolicy, newNonce } from "./.server/security-headers.server";
import { logger } from "./.server/log.server";

/**
 * The framework's server error hook: every error a loader, action or render threw (not the
 * Responses routes throw on purpose) is one JSON log line with the request's id, method and path.
 * A request the client gave up on is not an error of ours.
 */
export const handleError: HandleErrorFunction = (error, { request }) => {
  if (request.signal.aborted) return;
  const url = new URL(request.url);
  logger.error({ err: error, method: request.method, path: url.pathname, requestId: request.headers.get("x-request-id") ?? undefined }, "unhandled error while answering a request");
};

export const streamTimeout = 5_000;

export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
  _loadContext: RouterContextProvider,
) {
  const nonce = newNonce();
  responseHeaders.set("Content-Security-Policy", documentPolicy(nonce, import.meta.env.DEV));
  if (request.method.toUpperCase() === "HEAD") {
    return new Response(null, { status: responseStatusCode, headers: responseHeaders });
  }
  return new Promise<Response>((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");
    const readyOption: keyof RenderToPipeableStreamOptions = (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";
    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(() => abort(), streamTimeout + 1000);
    const { pipe, abort } = renderToPipeableStream(<ServerRouter context={routerContext} url={request.url} nonce={nonce} />, {
      nonce,
      [readyOption]() {
        shellRendered = true;
        const body = new PassThrough({
          final(callback) {
            clearTimeout(timeoutId);
            timeoutId = undefined;
            callback();
          },
        });
        responseHeaders.set("Content-Type", "text/html");
        pipe(body);
        resolve(new Response(createReadableStreamFromReadable(body), { headers: responseHeaders, status: responseStatusCode }));
      },
      onShellError(error: unknown) {
        reject(error);
      },
      onError(error: unknown) {
        responseStatusCode = 500;
        if (shellRendered) logger.error({ err: error, path: new URL(request.url).pathname }, "error while streaming a page");
      },
    });
  });
}
