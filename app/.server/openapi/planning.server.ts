// Practicals (lab sessions), their benches, and the designer's feed check.
import { badRequest, errorResponses, json, notFound, pathId, ref, type ApiPart } from "./part.server";

const num = { type: "number" };
export const planningPart: ApiPart = {
  tags: [{ name: "planning", description: "Practicals, benches and feeds." }],
  schemas: {
    SessionSummary: {
      type: "object",
      required: ["id", "title", "date", "slotMinutes", "status", "benchCount"],
      properties: {
        id: { type: "integer" },
        title: { type: "string" },
        date: { type: "string", format: "date" },
        slotMinutes: { type: "integer" },
        status: { type: "string", enum: ["draft", "planned", "notified", "closed"] },
        benchCount: { type: "integer" },
      },
    },
    Bench: {
      type: "object",
      required: ["id", "label", "CA0", "CB0", "temperatureC", "groupId", "predicted"],
      properties: {
        id: { type: "integer" },
        label: { type: "string" },
        CA0: { ...num, description: "mol/L in the reactor" },
        CB0: { ...num, description: "mol/L in the reactor" },
        temperatureC: num,
        groupId: { type: ["integer", "null"] },
        groupName: { type: ["string", "null"] },
        predicted: {
          type: "object",
          required: ["minutesToTarget", "targetConversion"],
          properties: { minutesToTarget: { type: ["number", "null"] }, targetConversion: num },
        },
        reference: { type: "object", required: ["kAtT"], properties: { kAtT: { ...num, description: "per second, mol/L (staff only)" } } },
        warnings: { type: "array", items: { type: "object", required: ["code", "message"], properties: { code: { type: "string" }, message: { type: "string" } } } },
      },
    },
    Session: {
      type: "object",
      required: ["id", "title", "slotMinutes", "setupMinutes", "reaction", "benches"],
      properties: {
        id: { type: "integer" },
        courseId: { type: "integer" },
        title: { type: "string" },
        date: { type: "string", format: "date" },
        status: { type: "string" },
        slotMinutes: { type: "integer" },
        setupMinutes: { type: "integer" },
        samplingIntervalS: { type: "integer" },
        reactorVolumeMl: num,
        stockAMolL: num,
        stockBMolL: num,
        deadline: { type: ["string", "null"], format: "date-time" },
        notifiedAt: { type: ["string", "null"], format: "date-time" },
        reaction: {
          type: "object",
          required: ["name", "a", "b", "orderA", "orderB", "measured"],
          properties: {
            name: { type: "string" },
            speciesA: { type: "string" },
            speciesB: { type: "string" },
            a: num,
            b: num,
            orderA: { type: "integer" },
            orderB: { type: "integer" },
            measured: { type: "string", enum: ["concentration", "conductivity", "absorbance", "titration"] },
            reference: {
              type: "object",
              description: "staff only",
              required: ["k", "TrefC", "EaKJ"],
              properties: { k: num, TrefC: num, EaKJ: num, source: { type: "string" } },
            },
          },
        },
        benches: { type: "array", items: ref("Bench"), description: "every bench for staff; a student's own group's bench only" },
        rubric: {
          type: "object",
          description: "staff only. The experiment check's bands (fullWithinPct, partialWithinPct, partialFraction), the weights as shares of 1, the analysis check's bands (analysis*, marking defaults when absent) and the percent of the mark each corrected slip costs",
          required: ["fullWithinPct", "partialWithinPct", "partialFraction", "analysisWeight", "experimentWeight", "latePenaltyPct"],
          properties: { fullWithinPct: num, partialWithinPct: num, partialFraction: num, analysisWeight: num, experimentWeight: num, latePenaltyPct: num, analysisFullWithinPct: num, analysisPartialWithinPct: num, analysisPartialFraction: num, correctionCostPct: num },
        },
      },
    },
    FeedCheck: {
      type: "object",
      required: ["problems", "benches"],
      properties: {
        problems: { type: "array", items: { type: "object", required: ["path", "message"], properties: { path: { type: "string" }, message: { type: "string" } } } },
        benches: {
          type: "array",
          items: {
            type: ["object", "null"],
            required: ["label", "minutesToTarget", "kAtT", "limiting", "volumes", "warnings", "curve"],
            properties: {
              label: { type: "string" },
              ratio: num,
              limiting: { type: "string", enum: ["A", "B"] },
              kAtT: num,
              minutesToTarget: { type: ["number", "null"] },
              volumes: { type: "object", required: ["stockAMl", "stockBMl", "waterMl"], properties: { stockAMl: num, stockBMl: num, waterMl: num } },
              warnings: { type: "array", items: { type: "object", required: ["code", "message"] } },
              curve: { type: "array", items: { type: "array", items: num }, description: "[minutes, CA in mol/L]" },
            },
          },
        },
      },
    },
  },
  paths: {
    "/api/courses/{courseId}/sessions": {
      get: {
        tags: ["planning"],
        summary: "Practicals of a course (members)",
        parameters: [pathId("courseId", "the course")],
        responses: { "200": json({ type: "array", items: ref("SessionSummary") }, "The course's practicals by date."), ...errorResponses, ...notFound },
      },
    },
    "/api/sessions/{sessionId}": {
      get: {
        tags: ["planning"],
        summary: "One practical (members; students see only their own bench and no reference)",
        parameters: [pathId("sessionId", "the practical")],
        responses: { "200": json(ref("Session"), "The practical."), ...errorResponses, ...notFound },
      },
    },
    "/api/feed-check": {
      post: {
        tags: ["planning"],
        summary: "Predict and check bench feeds (staff; the designer's live check)",
        requestBody: {
          required: true,
          content: {
            "application/json": {
              schema: { type: "object", required: ["reactionSystemId", "session", "benches"] },
              example: {
                reactionSystemId: "{reactionSystemId}",
                session: { slotMinutes: 180, setupMinutes: 30, samplingIntervalS: 120, reactorVolumeMl: 250, stockAMolL: 0.1, stockBMolL: 0.1, targetConversion: 0.8 },
                benches: [{ label: "1", CA0: 0.02, CB0: 0.03, temperatureC: 25 }],
              },
            },
          },
        },
        responses: { "200": json(ref("FeedCheck"), "Predictions and warnings per bench (null entries while a problem blocks the check)."), ...badRequest, ...errorResponses, ...notFound },
      },
    },
  },
};
