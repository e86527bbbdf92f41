// Personal API tokens: made with the session cookie, revoked by their owner.
import { badRequest, errorResponses, json, notFound, pathId, ref, type ApiPart } from "./part.server";

export const tokensPart: ApiPart = {
  tags: [{ name: "tokens", description: "Personal API tokens, sent as `Authorization: Bearer <token>`." }],
  schemas: {
    NewApiToken: {
      type: "object",
      required: ["id", "token", "name", "expiresAt"],
      properties: {
        id: { type: "integer" },
        token: { type: "string", description: "The token itself. It is in this answer only: Ratebook keeps its SHA-256." },
        name: { type: "string" },
        expiresAt: { type: ["string", "null"], format: "date-time", description: "null for a token that does not expire" },
      },
    },
  },
  paths: {
    "/api/tokens": {
      post: {
        tags: ["tokens"],
        summary: "Make a personal API token (signed in with the session cookie, not with a token)",
        security: [{ cookieSession: [] }],
        requestBody: {
          required: true,
          content: {
            "application/json": {
              schema: {
                type: "object",
                required: ["name"],
                properties: {
                  name: { type: "string", minLength: 1, maxLength: 80 },
                  expiresInDays: { type: "integer", minimum: 1, maximum: 366, description: "left out: the token does not expire" },
                },
              },
              example: { name: "marks export script", expiresInDays: 30 },
            },
          },
        },
        responses: { "201": json(ref("NewApiToken"), "The new token, shown this once."), ...badRequest, ...errorResponses },
      },
    },
    "/api/tokens/{tokenId}": {
      delete: {
        tags: ["tokens"],
        summary: "Revoke one of your tokens; it is refused from the next request on",
        parameters: [pathId("tokenId", "The token's id (from POST /api/tokens or the account page).")],
        responses: { "204": { description: "Revoked (revoking twice is fine)." }, ...notFound, ...errorResponses },
      },
    },
  },
};
