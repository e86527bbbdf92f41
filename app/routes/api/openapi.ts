import { openApiDocument } from "~/.server/openapi/document.server";

/** The OpenAPI 3.1 description of the whole JSON API; public, like any API reference. */
export function loader() {
  return Response.json(openApiDocument(), { headers: { "Cache-Control": "no-cache" } });
}
