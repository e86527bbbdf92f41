// Building blocks for the OpenAPI 3.1 document. Each area of the API describes its own paths in
// its own file (an ApiPart) and is listed once in document.server.ts.
export type JsonSchema = Record<string, unknown>;

export interface ApiPart {
  /** path -> method -> OpenAPI operation object */
  paths: Record<string, Record<string, unknown>>;
  /** named schemas under components.schemas */
  schemas?: Record<string, JsonSchema>;
  tags?: Array<{ name: string; description: string }>;
}

export const ref = (name: string) => ({ $ref: `#/components/schemas/${name}` });

export const json = (schema: JsonSchema, description: string) => ({
  description,
  content: { "application/json": { schema } },
});

/** The error answers every API path can give (see shared/api.md). */
export const errorResponses = {
  "401": json(ref("Error"), "Not signed in and no valid token."),
  "403": json(ref("Error"), "Signed in, but this resource is not yours to see."),
};
export const notFound = { "404": json(ref("Error"), "No such resource (or its existence must not leak).") };
export const badRequest = { "400": json(ref("ValidationErrors"), "Malformed body or query; every problem with its path.") };

export const pathId = (name: string, description: string) => ({
  name,
  in: "path",
  required: true,
  description,
  schema: { type: "integer", minimum: 1 },
});
