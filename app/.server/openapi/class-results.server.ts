// Class results: a practical's pooled Arrhenius fit over its benches' marking k, beside the
// reaction system's reference, and each bench's k against the reference (staff only).
import { errorResponses, json, notFound, pathId, ref, type ApiPart } from "./part.server";

const num = { type: "number" };
const numOrNull = { type: ["number", "null"] };
const pair = (description: string) => ({ type: "array", items: num, minItems: 2, maxItems: 2, description });
const points = (description: string) => ({ type: "array", items: { type: "array", items: num, minItems: 2, maxItems: 2 }, description });

export const classResultsPart: ApiPart = {
  tags: [{ name: "class results", description: "A practical's pooled Arrhenius fit and the spread of its benches' k (staff only)." }],
  schemas: {
    ClassBench: {
      type: "object",
      required: ["benchId", "bench", "group", "temperatureC", "status", "k", "kCI95", "kRefAtT", "deviationPct", "state", "exclusion"],
      properties: {
        benchId: { type: "integer" },
        bench: { type: "string", description: "the bench's label" },
        group: { type: "string" },
        temperatureC: num,
        submissionId: { type: ["integer", "null"], description: "the version that counts: the one a reviewer chose, else the latest marked one, else the latest" },
        status: { type: ["string", "null"], enum: ["queued", "marked", "refused", "failed", null] },
        k: { ...numOrNull, description: "marking k of the latest version, per second with concentrations in mol/L" },
        kStdErr: numOrNull,
        kCI95: { type: ["array", "null"], items: num, minItems: 2, maxItems: 2, description: "95 % interval of k" },
        kRefAtT: { ...num, description: "reference k at the bench's temperature (Arrhenius)" },
        deviationPct: { ...numOrNull, description: "100 (k − kRefAtT) / kRefAtT; null without a marked k" },
        state: { type: "string", enum: ["in-fit", "excluded", "no-upload", "not-marked", "no-k"] },
        note: { type: ["string", "null"], description: "why the bench is not in the fit" },
        exclusion: {
          type: ["object", "null"],
          required: ["reason", "by", "at"],
          properties: { benchId: { type: "integer" }, reason: { type: "string" }, by: { type: ["string", "null"] }, at: { type: "string", format: "date-time" } },
          description: "set when an instructor left the bench out of the fit",
        },
        inverseT: { ...num, description: "1/T in 1/K" },
        lnK: numOrNull,
        kFitted: { ...numOrNull, description: "the class line's k at this temperature (benches in the fit)" },
        lnResidual: numOrNull,
      },
    },
    ClassResults: {
      type: "object",
      required: ["session", "reaction", "reference", "fit", "noFit", "benches", "counts", "plot"],
      properties: {
        session: {
          type: "object",
          required: ["id", "courseId", "title", "date", "status"],
          properties: { id: { type: "integer" }, courseId: { type: "integer" }, courseCode: { type: "string" }, title: { type: "string" }, date: { type: "string", format: "date" }, status: { type: "string" } },
        },
        reaction: {
          type: "object",
          required: ["name", "kUnit"],
          properties: { name: { type: "string" }, kUnit: { type: "string", enum: ["1/s", "L/(mol·s)"] }, orderA: { type: "integer" }, orderB: { type: "integer" } },
        },
        reference: {
          type: "object",
          required: ["kRef", "TrefC", "EaKJ", "A", "lnA"],
          properties: { kRef: { ...num, description: "per second at TrefC" }, TrefC: num, EaKJ: num, A: { ...num, description: "kRef exp(Ea / (R Tref)), the unit of k" }, lnA: num },
        },
        fit: {
          type: ["object", "null"],
          description: "weighted least squares of ln k on 1/T over the benches in the fit; null with fewer than 3 benches or one temperature",
          required: ["EaKJ", "EaKJCI95", "A", "ACI95", "n", "dof", "weighting"],
          properties: {
            EaKJ: num, EaKJCI95: pair("95 % interval of Ea, kJ/mol"), A: { ...num, description: "the unit of k" }, ACI95: pair("95 % interval of A (from ln A's)"),
            lnA: num, r2: numOrNull, n: { type: "integer" }, dof: { type: "integer" },
            weighting: { type: "string", enum: ["k-uncertainty", "equal"] }, reducedChiSquare: numOrNull,
          },
        },
        noFit: { type: ["string", "null"], description: "why there is no fit, in words" },
        benches: { type: "array", items: ref("ClassBench") },
        counts: { type: "object", required: ["inFit", "excluded", "waiting"], properties: { inFit: { type: "integer" }, excluded: { type: "integer" }, waiting: { type: "integer" } } },
        plot: {
          type: "object",
          required: ["inFit", "excluded", "fitted", "reference"],
          description: "[1000/T in 1/K, ln k] pairs",
          properties: { inFit: points("benches in the fit"), excluded: points("benches left out"), fitted: points("ends of the class line"), reference: points("ends of the reference line") },
        },
        canChange: { type: "boolean", description: "whether the caller may leave benches out (instructors, admins)" },
      },
    },
  },
  paths: {
    "/api/sessions/{sessionId}/class-results": {
      get: {
        tags: ["class results"],
        summary: "A practical's pooled Arrhenius fit and each bench's k against the reference (instructors and demonstrators)",
        parameters: [pathId("sessionId", "the practical")],
        responses: { "200": json(ref("ClassResults"), "The class fit, the reference and every bench."), ...errorResponses, ...notFound },
      },
    },
  },
};
