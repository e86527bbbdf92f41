// The production HTTP server (`npm run serve`): express 5 around React Router's request handler,
// so that what react-router-serve cannot do has a place:
// - the public origin is APP_URL: every request reaches the app with APP_URL's scheme and host, so
//   behind a proxy that terminates HTTPS the framework's check of page actions accepts the
//   browser's https://<host> origin, and only that origin (a foreign one is still refused, 400);
// - `trust proxy` when TRUST_PROXY=1 (client address and scheme from the load balancer);
// - a request id on every request (X-Request-Id, taken from a trusted proxy or made here), on
//   every log line (JSON lines through pino-http and the app's logger) and on error pages;
// - static files with nosniff; a 431 (headers too large) that answers JSON on /api/ paths.
import crypto from "node:crypto";
import http from "node:http";
import path from "node:path";
import { createReadableStreamFromReadable, writeReadableStreamToWritable } from "@react-router/node";
import compression from "compression";
import express, { type Request as ExpressRequest, type Response as ExpressResponse } from "express";
import { pinoHttp } from "pino-http";
import { createRequestHandler, type ServerBuild } from "react-router";
import { logger, requestContext } from "../../app/.server/log.server";

export interface HttpServerOptions {
  build: ServerBuild;
  /** folder of the client build (build/client) */
  clientDir: string;
  /** APP_URL: the address people use; null derives it from each request (development) */
  publicUrl: string | null;
  trustProxy: boolean;
  mode?: string;
}

const REQUEST_ID = /^[A-Za-z0-9._:-]{1,64}$/;

/** The request id: the trusted proxy's when it sent a sane one, otherwise a new one. */
function requestIdOf(req: http.IncomingMessage, trustProxy: boolean): string {
  const given = req.headers["x-request-id"];
  if (trustProxy && typeof given === "string" && REQUEST_ID.test(given)) return given;
  return crypto.randomUUID();
}

function staticHeaders(res: http.ServerResponse) {
  res.setHeader("X-Content-Type-Options", "nosniff");
  res.setHeader("X-Frame-Options", "DENY");
  res.setHeader("Referrer-Policy", "same-origin");
}

/** Builds the Fetch API request the app sees: APP_URL's origin, the path as sent. */
function appRequest(req: ExpressRequest, res: ExpressResponse, publicOrigin: string | null): Request {
  const origin = publicOrigin ?? `${req.protocol}://${req.get("host") ?? "localhost"}`;
  const url = new URL(req.originalUrl, origin);
  const headers = new Headers();
  for (const [key, value] of Object.entries(req.headers)) {
    if (value === undefined) continue;
    if (Array.isArray(value)) for (const v of value) headers.append(key, v);
    else headers.set(key, value);
  }
  const controller = new AbortController();
  res.on("close", () => {
    if (!res.writableFinished) controller.abort();
  });
  const init: RequestInit & { duplex?: "half" } = { method: req.method, headers, signal: controller.signal };
  if (req.method !== "GET" && req.method !== "HEAD") {
    init.body = createReadableStreamFromReadable(req);
    init.duplex = "half";
  }
  return new Request(url.href, init);
}

async function sendAppResponse(res: ExpressResponse, response: Response) {
  if (res.destroyed || res.writableEnded) {
    await response.body?.cancel();
    return;
  }
  res.statusMessage = response.statusText;
  res.status(response.status);
  for (const [key, value] of response.headers.entries()) res.append(key, value);
  if (/text\/event-stream/i.test(response.headers.get("content-type") ?? "")) res.flushHeaders();
  if (!response.body) {
    res.end();
    return;
  }
  try {
    await writeReadableStreamToWritable(response.body, res);
  } catch (error) {
    if (res.destroyed || res.writableEnded) return;
    throw error;
  }
}

export function createApp(options: HttpServerOptions) {
  const publicOrigin = options.publicUrl ? new URL(options.publicUrl).origin : null;
  const handle = createRequestHandler(options.build, options.mode ?? process.env.NODE_ENV);
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", options.trustProxy ? 1 : false);

  // The request id first, so that every later line (pino-http's and the app's) carries it.
  app.use((req, res, next) => {
    const requestId = requestIdOf(req, options.trustProxy);
    req.headers["x-request-id"] = requestId;
    res.setHeader("X-Request-Id", requestId);
    requestContext.run({ requestId, peerAddress: req.socket.remoteAddress }, next);
  });
  app.use(
    pinoHttp({
      logger,
      genReqId: (req) => String(req.headers["x-request-id"]),
      // the mixin adds requestId; pino-http's own `req.id` would repeat it
      quietReqLogger: true,
      customLogLevel: (_req, res, error) => (error || res.statusCode >= 500 ? "error" : res.statusCode >= 400 ? "warn" : "info"),
      serializers: {
        req: (req: { method: string; url: string; remoteAddress?: string }) => ({ method: req.method, url: req.url, remoteAddress: req.remoteAddress }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
    }),
  );
  app.use(compression());
  app.use("/assets", express.static(path.join(options.clientDir, "assets"), { immutable: true, maxAge: "1y", setHeaders: staticHeaders }));
  app.use(express.static(options.clientDir, { maxAge: "1h", setHeaders: staticHeaders }));
  app.all("/{*path}", async (req, res, next) => {
    try {
      const response = await handle(appRequest(req, res, publicOrigin));
      await sendAppResponse(res, response);
    } catch (error) {
      next(error);
    }
  });
  return app;
}

/** A request line that overflowed the header limit: JSON on /api/ paths, plain text elsewhere. */
export function headersTooLargeAnswer(rawPacket: Buffer | undefined): string {
  const firstLine = rawPacket ? rawPacket.subarray(0, 2048).toString("latin1").split("\r\n")[0] : "";
  const target = firstLine.split(" ")[1] ?? "";
  const api = target.startsWith("/api/") || target === "/api";
  const body = api
    ? JSON.stringify({ error: "The request's headers are too large (cookies included): send fewer or smaller headers." })
    : "The request's headers are too large (cookies included). Clear this site's cookies and try again.";
  const type = api ? "application/json; charset=utf-8" : "text/plain; charset=utf-8";
  return `HTTP/1.1 431 Request Header Fields Too Large\r\nContent-Type: ${type}\r\nContent-Length: ${Buffer.byteLength(body)}\r\nX-Content-Type-Options: nosniff\r\nConnection: close\r\n\r\n${body}`;
}

export function createHttpServer(options: HttpServerOptions): http.Server {
  const server = http.createServer(createApp(options));
  server.on("clientError", (error: NodeJS.ErrnoException & { rawPacket?: Buffer }, socket) => {
    if (!socket.writable) return socket.destroy();
    if (error.code === "HPE_HEADER_OVERFLOW") {
      socket.end(headersTooLargeAnswer(error.rawPacket));
      return;
    }
    if (error.code === "ECONNRESET") return socket.destroy();
    socket.end("HTTP/1.1 400 Bad Request\r\nConnection: close\r\nContent-Length: 0\r\n\r\n");
  });
  return server;
}
