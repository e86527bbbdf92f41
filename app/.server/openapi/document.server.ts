// The OpenAPI 3.1 document served at GET /api/openapi.json. Each area adds its paths in its own
// file under app/.server/openapi/ and lists it in `parts` below; tests/integration/openapi.test.ts
// calls every path it describes.
import type { ApiPart } from "./part.server";
import { corePart } from "./core.server";
import { tokensPart } from "./tokens.server";
import { planningPart } from "./planning.server";
import { submissionsPart } from "./submissions.server";
import { gradebookPart } from "./gradebook.server";
import { classResultsPart } from "./class-results.server";
import { tableViewsPart } from "./table-views.server";

const parts: ApiPart[] = [corePart, tokensPart, planningPart, submissionsPart, gradebookPart, classResultsPart, tableViewsPart];

export function openApiDocument() {
  const paths: Record<string, Record<string, unknown>> = {};
  const schemas: Record<string, unknown> = {};
  const tags: Array<{ name: string; description: string }> = [];
  for (const part of parts) {
    for (const [p, item] of Object.entries(part.paths)) {
      for (const method of Object.keys(item)) {
        if (paths[p]?.[method]) throw new Error(`OpenAPI: ${method.toUpperCase()} ${p} is described twice`);
      }
      paths[p] = { ...paths[p], ...item };
    }
    for (const [name, schema] of Object.entries(part.schemas ?? {})) {
      if (schemas[name]) throw new Error(`OpenAPI: schema ${name} is defined twice`);
      schemas[name] = schema;
    }
    tags.push(...(part.tags ?? []));
  }
  return {
    openapi: "3.1.0",
    info: {
      title: "Ratebook API",
      version: "1",
      description:
        "JSON API of Ratebook. Concentrations in mol/L, times in seconds, temperatures in degrees Celsius, k per second " +
        "with concentrations in mol/L, unless a field's name says otherwise. Errors: 401/403/404 `{ error }`, 400 `{ errors: [{ path, message }] }`.",
    },
    servers: [{ url: "/" }],
    security: [{ cookieSession: [] }, { bearerToken: [] }],
    tags,
    paths,
    components: {
      schemas,
      securitySchemes: {
        cookieSession: { type: "apiKey", in: "cookie", name: "__ratebook_session", description: "The session cookie of a signed-in person." },
        bearerToken: { type: "http", scheme: "bearer", description: "A personal API token from the account page." },
      },
    },
  };
}
