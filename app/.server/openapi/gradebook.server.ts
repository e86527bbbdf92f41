// Gradebooks: per practical (a row per group at a bench) and per course (a row per student).
import { badRequest, errorResponses, json, notFound, pathId, ref, type ApiPart } from "./part.server";

const num = { type: "number" };
const numOrNull = { type: ["number", "null"] };
const percent = (description: string) => ({ type: ["number", "null"], minimum: 0, maximum: 100, description });

export const gradebookPart: ApiPart = {
  tags: [{ name: "gradebook", description: "Marks per practical and per course (staff only)." }],
  schemas: {
    SessionGradebookRow: {
      type: "object",
      required: ["groupId", "group", "bench", "CA0", "CB0", "temperatureC", "k", "kCI95", "kRefAtT", "deviationPct", "analysisPart", "experimentPart", "late", "overridden", "mark", "flags"],
      properties: {
        groupId: { type: "integer" },
        group: { type: "string" },
        members: { type: "array", items: { type: "string" } },
        benchId: { type: "integer" },
        bench: { type: "string", description: "the bench's label" },
        CA0: { ...num, description: "mol/L in the reactor" },
        CB0: { ...num, description: "mol/L in the reactor" },
        feedRatio: { ...num, description: "feed ratio M = CB0/(ν·CA0), ν = b/a (1 is the stoichiometric feed)" },
        temperatureC: num,
        submissionId: { type: ["integer", "null"], description: "the version that counts (the one a reviewer chose, else the latest marked one, else the latest); null: nothing uploaded" },
        version: { type: ["integer", "null"] },
        status: { type: ["string", "null"], enum: ["queued", "marked", "refused", "failed", null] },
        submittedAt: { type: ["string", "null"], format: "date-time" },
        k: { ...numOrNull, description: "marking k, per second with concentrations in mol/L" },
        kStdErr: numOrNull,
        kCI95: { type: ["array", "null"], items: num, minItems: 2, maxItems: 2, description: "95 % interval of k" },
        kRefAtT: { ...num, description: "reference k at the bench's temperature (Arrhenius), per second" },
        deviationPct: { ...numOrNull, description: "100 (k − kRefAtT) / kRefAtT" },
        experimentPart: percent("percent of the practical's marks from the experiment check, after its weight"),
        analysisPart: percent("percent of the practical's marks from the analysis check, after its weight"),
        latePenalty: percent("percent taken off for lateness"),
        late: { type: "boolean" },
        overridden: { type: "boolean" },
        overrideReason: { type: ["string", "null"] },
        mark: percent("0-100: the override, else the automatic mark of a marked version"),
        flags: { type: "array", items: { type: "string" }, description: "codes of the engine's flags" },
        reviewState: { type: ["string", "null"], enum: ["to-check", "checked", null] },
      },
    },
    SessionGradebook: {
      type: "object",
      required: ["session", "reaction", "rows"],
      properties: {
        session: {
          type: "object",
          required: ["id", "courseId", "title", "date", "status"],
          properties: {
            id: { type: "integer" }, courseId: { type: "integer" }, courseCode: { type: "string" }, title: { type: "string" },
            date: { type: "string", format: "date" }, status: { type: "string" }, deadline: { type: ["string", "null"], format: "date-time" },
            marksReleasedAt: { type: ["string", "null"], format: "date-time" }, gradeWeight: num,
          },
        },
        reaction: {
          type: "object",
          required: ["name", "kRef", "TrefC", "EaKJ"],
          properties: {
            name: { type: "string" }, kRef: { ...num, description: "per second at TrefC" }, TrefC: num, EaKJ: num, measured: { type: "string" },
            orderA: { type: "integer", description: "order in A" }, orderB: { type: "integer", description: "order in B (k in 1/s when the orders add up to 1, else L/(mol·s))" },
          },
        },
        rows: { type: "array", items: ref("SessionGradebookRow") },
      },
    },
    CourseGradebook: {
      type: "object",
      required: ["sessions", "rows"],
      properties: {
        course: {
          type: "object",
          required: ["id", "code", "title", "missingCountsAsZero"],
          properties: { id: { type: "integer" }, code: { type: "string" }, title: { type: "string" }, term: { type: "string" }, missingCountsAsZero: { type: "boolean" } },
        },
        sessions: {
          type: "array",
          items: {
            type: "object",
            required: ["id", "title", "date", "weight"],
            properties: {
              id: { type: "integer" }, title: { type: "string" }, date: { type: "string", format: "date" }, status: { type: "string" },
              weight: { ...num, description: "weight in the total; 0 leaves the practical out" },
              due: { type: "boolean", description: "closed, released or past its deadline" },
              deadline: { type: ["string", "null"], format: "date-time" },
              released: { type: "boolean" }, benchCount: { type: "integer" }, marked: { type: "integer" },
            },
          },
        },
        rows: {
          type: "array",
          items: {
            type: "object",
            required: ["studentId", "name", "group", "marks", "total"],
            properties: {
              userId: { type: "integer" },
              studentId: { type: ["string", "null"], description: "the institution's student ID from the roster" },
              name: { type: "string" }, email: { type: "string" },
              groupId: { type: ["integer", "null"] }, group: { type: ["string", "null"] },
              marks: { type: "object", additionalProperties: percent("mark in percent; null: missing or not yet marked"), description: "practical id -> mark" },
              total: percent("weighted mean of the marks; missing work left out unless the course counts it as zero"),
              missing: { type: "integer", description: "due practicals with no mark" },
            },
          },
        },
      },
    },
  },
  paths: {
    "/api/sessions/{sessionId}/gradebook": {
      get: {
        tags: ["gradebook"],
        summary: "A practical's gradebook: a row per group at a bench (instructors and demonstrators)",
        parameters: [
          pathId("sessionId", "the practical"),
          { name: "status", in: "query", required: false, description: "only rows whose latest version has one of these statuses (comma-separated; none: nothing uploaded)", schema: { type: "string", examples: ["marked,none"] } },
          { name: "flagged", in: "query", required: false, description: "only rows with (true) or without (false) flags", schema: { type: "string", enum: ["true", "false"] } },
        ],
        responses: { "200": json(ref("SessionGradebook"), "The practical's rows by bench."), ...badRequest, ...errorResponses, ...notFound },
      },
    },
    "/api/courses/{courseId}/gradebook": {
      get: {
        tags: ["gradebook"],
        summary: "A course's gradebook: a row per student with each practical's mark and the weighted total (instructors and demonstrators)",
        parameters: [
          pathId("courseId", "the course"),
          { name: "sessions", in: "query", required: false, description: "only these practicals' marks (comma-separated ids); the totals stay the whole course's", schema: { type: "string" } },
        ],
        responses: { "200": json(ref("CourseGradebook"), "Every student of the course by name."), ...badRequest, ...errorResponses, ...notFound },
      },
    },
  },
};
