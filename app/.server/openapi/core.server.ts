// Who is asking, their courses, the fit engine, and this document itself.
import { badRequest, errorResponses, json, ref, type ApiPart } from "./part.server";

export const corePart: ApiPart = {
  tags: [
    { name: "people", description: "The caller, their courses and groups." },
    { name: "engine", description: "The kinetics engine." },
  ],
  schemas: {
    Error: { type: "object", required: ["error"], properties: { error: { type: "string" } } },
    ValidationErrors: {
      type: "object",
      required: ["errors"],
      properties: {
        errors: {
          type: "array",
          items: { type: "object", required: ["path", "message"], properties: { path: { type: "string" }, message: { type: "string" } } },
        },
      },
    },
    CourseRef: {
      type: "object",
      required: ["id", "code", "title", "role"],
      properties: {
        id: { type: "integer" },
        code: { type: "string" },
        title: { type: "string" },
        role: { type: "string", enum: ["instructor", "demonstrator", "student"], description: "the caller's role in the course (admins act as instructors)" },
      },
    },
    GroupRef: {
      type: "object",
      required: ["id", "name", "courseId", "sessionId", "benchId"],
      description: "One entry per session in which the group has a bench (sessionId and benchId null when it has none yet).",
      properties: {
        id: { type: "integer" },
        name: { type: "string" },
        courseId: { type: "integer" },
        sessionId: { type: ["integer", "null"] },
        benchId: { type: ["integer", "null"] },
      },
    },
    Me: {
      type: "object",
      required: ["user", "courses", "groups"],
      properties: {
        user: {
          type: "object",
          required: ["id", "displayName", "email", "role"],
          properties: {
            id: { type: "integer" },
            displayName: { type: "string" },
            email: { type: "string" },
            role: { type: "string", enum: ["admin", "course-creator", "member"], description: "account type; what a person may do in a course follows their course role" },
          },
        },
        courses: { type: "array", items: ref("CourseRef") },
        groups: { type: "array", items: ref("GroupRef") },
      },
    },
  },
  paths: {
    "/api/me": {
      get: {
        tags: ["people"],
        summary: "The signed-in person, their courses and their groups",
        responses: { "200": json(ref("Me"), "The caller."), ...errorResponses },
      },
    },
    "/api/courses": {
      get: {
        tags: ["people"],
        summary: "The caller's courses",
        responses: { "200": json({ type: "array", items: ref("CourseRef") }, "Courses the caller belongs to (all, for an admin)."), ...errorResponses },
      },
    },
    "/api/fit": {
      post: {
        tags: ["engine"],
        summary: "Fit an integrated rate law to one run (staff)",
        description: "The same request and result as `npm run fit`; see app/lib/kinetics/README.md.",
        requestBody: {
          required: true,
          content: {
            "application/json": {
              schema: { type: "object", required: ["reaction", "feed", "units", "measurement", "points"] },
              example: {
                reaction: { a: 1, b: 1, orderA: 1, orderB: 1 },
                feed: { CA0: 0.02, CB0: 0.04 },
                units: { time: "s", concentration: "mol/L" },
                measurement: { kind: "concentrationA" },
                points: [[0, 0.02], [120, 0.0167], [240, 0.0142], [360, 0.0122], [480, 0.0106], [600, 0.0093]],
                temperatureC: 25,
              },
            },
          },
        },
        responses: {
          "200": json({ type: "object", required: ["k", "kCI95", "flags"] }, "The fit."),
          ...badRequest,
          ...errorResponses,
        },
      },
    },
    "/api/openapi.json": {
      get: {
        tags: ["people"],
        summary: "This document",
        security: [],
        responses: { "200": json({ type: "object", required: ["openapi", "paths"] }, "The OpenAPI 3.1 document.") },
      },
    },
  },
};
