// Uploads, marking and the stored originals (see shared/api.md).
import { badRequest, errorResponses, json, notFound, pathId, ref, type ApiPart } from "./part.server";

const problem = { type: "object", required: ["row", "column", "message"], properties: { row: { type: "integer", description: "1-based row of the file; 0 when the whole file is concerned" }, column: { type: "string" }, message: { type: "string" } } };
const unavailable = { "503": json(ref("Error"), "The database is not reachable for a moment; nothing was stored. Retry after the Retry-After seconds.") };

// A small invented run for the document's own test (tests/integration/openapi.test.ts).
const exampleCsv = "t / min;CA (mmol/L)\n0;20,0\n2;17,1\n4;14,9\n6;13,2\n8;11,8\n10;10,7\n";

export const submissionsPart: ApiPart = {
  tags: [{ name: "submissions", description: "A group's uploaded readings, their marking and feedback." }],
  schemas: {
    ReadingProblem: problem,
    SubmissionCreated: {
      type: "object",
      required: ["id", "version", "status"],
      properties: {
        id: { type: "integer" },
        version: { type: "integer", description: "1 for the group's first upload in this practical, then 2, 3, ..." },
        status: { type: "string", enum: ["queued", "refused"] },
        late: { type: "boolean" },
        problems: { type: "array", items: ref("ReadingProblem") },
      },
    },
    Submission: {
      type: "object",
      required: ["id", "groupId", "version", "status", "submittedAt", "late", "problems", "fit", "flags", "feedback", "mark"],
      properties: {
        id: { type: "integer" },
        groupId: { type: "integer" },
        sessionId: { type: "integer" },
        version: { type: "integer" },
        status: { type: "string", enum: ["queued", "marked", "refused", "failed"], description: "failed: marking failed; the group and staff both see it, with markingError" },
        submittedAt: { type: "string" },
        late: { type: "boolean" },
        originalName: { type: ["string", "null"] },
        problems: { type: "array", items: ref("ReadingProblem") },
        fit: { type: ["object", "null"], description: "the engine result (app/lib/kinetics/README.md); for a group the reference comparison is removed unless released with it" },
        flags: { type: "array", items: { type: "object", required: ["code", "message", "rows"], properties: { code: { type: "string" }, message: { type: "string" }, rows: { type: "array", items: { type: "integer" } } } } },
        feedback: { type: "array", items: { type: "string" }, description: "lines written for the group; empty for a group before release" },
        mark: { type: ["number", "null"], description: "percent (0-100) of the practical's marks; null for a group before release" },
        released: { type: "boolean" },
        reportedK: { type: ["number", "null"], description: "per second" },
        reportedMethod: { type: ["string", "null"] },
        parts: { type: "object", description: "experimentPart, analysisPart, latePenalty, autoMark, overrideMark (percent); staff, and the group after release" },
        checks: { type: ["object", "null"], description: "staff only: kMarking, kLine, kRefAtT and both checks' deviations and bands" },
        markingError: { type: ["string", "null"], description: "why marking failed: staff see it as stored, the group in its words (present for a failed version)" },
      },
    },
    SubmissionList: {
      type: "object",
      required: ["submissions"],
      properties: {
        submissions: {
          type: "array",
          items: {
            type: "object",
            required: ["id", "version", "status", "submittedAt", "late", "originalName", "size", "sha256", "mark"],
            properties: {
              id: { type: "integer" }, sessionId: { type: "integer" }, version: { type: "integer" }, status: { type: "string" }, submittedAt: { type: "string" },
              late: { type: "boolean" }, originalName: { type: "string" }, size: { type: "integer" }, sha256: { type: "string" }, mark: { type: ["number", "null"] }, released: { type: "boolean" },
            },
          },
        },
      },
    },
  },
  paths: {
    "/api/groups/{groupId}/submissions": {
      post: {
        parameters: [pathId("groupId", "the group")],
        tags: ["submissions"],
        summary: "Upload a group's readings (CSV or .xlsx, at most 5 MB) as its next version; marking is queued",
        "x-test-caller": "student",
        requestBody: {
          required: true,
          content: {
            "multipart/form-data": {
              schema: {
                type: "object",
                required: ["file"],
                properties: {
                  file: { type: "string", contentMediaType: "application/octet-stream", description: "CSV (comma, semicolon or tab; decimal comma; header optional) or .xlsx" },
                  timeColumn: { type: "string", description: "header text or 1-based number; guessed when left out" },
                  valueColumn: { type: "string", description: "header text or 1-based number; guessed when left out" },
                  measured: { type: "string", description: "the practical's measured quantity (default) or concentrationA" },
                  timeUnit: { type: "string", enum: ["s", "min", "h"] },
                  concentrationUnit: { type: "string", enum: ["mol/L", "mmol/L"] },
                  reportedK: { type: "string", description: "the k the group worked out, per second" },
                  reportedMethod: { type: "string", enum: ["ln(CA0/CA)", "1/CA - 1/CA0", "ln[(CB*CA0)/(CB0*CA)]", "curve-fit", "other"] },
                  sessionId: { type: "string", description: "the practical, when the group has benches in several" },
                  startTime: { type: "string", description: "clock time of mixing (hh:mm or hh:mm:ss) for times written as clock times; without it they count from the first reading" },
                },
              },
              "x-test-example": { file: { name: "invented-run.csv", type: "text/csv", text: exampleCsv }, fields: { measured: "concentrationA", reportedK: "0.0153", reportedMethod: "ln[(CB*CA0)/(CB0*CA)]" } },
            },
          },
        },
        responses: {
          "202": json(ref("SubmissionCreated"), "Stored; marking is queued. Location names the submission."),
          "422": json({ type: "object", required: ["id", "version", "status", "errors"], properties: { id: { type: "integer" }, version: { type: "integer" }, status: { type: "string", enum: ["refused"] }, errors: ref("ValidationErrors") } }, "Stored but refused (empty, binary, no numeric column pair, fewer than 4 usable rows, or readings the marking would refuse: conversion sent as a concentration, %T as absorbance, readings below zero by more than noise); the message says why and where."),
          "413": json(ref("ValidationErrors"), "The file is larger than 5 MB."),
          ...badRequest,
          ...errorResponses,
          ...notFound,
          ...unavailable,
        },
      },
      get: {
        parameters: [pathId("groupId", "the group")],
        tags: ["submissions"],
        summary: "The group's versions, newest first",
        "x-test-caller": "student",
        responses: { "200": json(ref("SubmissionList"), "Every version with its stored file's name, size and SHA-256."), ...errorResponses, ...notFound, ...unavailable },
      },
    },
    "/api/groups/{groupId}/submissions/preview": {
      post: {
        parameters: [pathId("groupId", "the group")],
        tags: ["submissions"],
        summary: "Parse and fit an upload without storing it (the upload page's live preview); no reference value in the answer",
        "x-test-caller": "student",
        requestBody: {
          required: true,
          content: { "multipart/form-data": { schema: { type: "object", required: ["file"] }, "x-test-example": { file: { name: "invented-run.csv", type: "text/csv", text: exampleCsv }, fields: { measured: "concentrationA" } } } },
        },
        responses: {
          "200": json({ type: "object", required: ["columns", "problems", "refused", "fit", "n"], properties: { columns: { type: "array" }, problems: { type: "array", items: ref("ReadingProblem") }, refused: { type: ["string", "null"] }, fit: { type: ["object", "null"] }, n: { type: "integer" }, plots: { type: ["object", "null"] } } }, "What was read, the problems and the fit."),
          "413": json(ref("ValidationErrors"), "The file is larger than 5 MB."),
          ...badRequest,
          ...errorResponses,
          ...notFound,
          ...unavailable,
        },
      },
    },
    "/api/submissions/{submissionId}": {
      get: {
        parameters: [pathId("submissionId", "the submission (one version)")],
        tags: ["submissions"],
        summary: "One version, as its caller may see it",
        responses: { "200": json(ref("Submission"), "The submission."), ...errorResponses, ...notFound, ...unavailable },
      },
    },
    "/api/submissions/{submissionId}/original": {
      get: {
        parameters: [pathId("submissionId", "the submission (one version)")],
        tags: ["submissions"],
        summary: "The uploaded bytes exactly as stored, with their content type and file name (X-Content-SHA256 header)",
        responses: {
          "200": { description: "The original file.", content: { "text/csv": { schema: { type: "string" } }, "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet": { schema: { type: "string" } }, "application/octet-stream": { schema: { type: "string" } } } },
          ...errorResponses,
          ...notFound,
          ...unavailable,
        },
      },
    },
  },
};
