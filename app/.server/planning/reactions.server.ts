// The course's reaction-system library: the form's schema, creating and listing.
import { z } from "zod";
import { parseWithZod } from "@conform-to/zod/v4";
import { ReactionSystem, MEASURED_QUANTITIES, type Calibration, type Hazard, type Stock } from "../db/reaction-systems.server";
import type { User } from "../db/models.server";
import { sequelize } from "../db/models.server";
import { recordAudit } from "../audit.server";
import { isHazardCode, isPictogramCode, splitCodes } from "~/lib/planning/hazards";

const positive = (what: string) => z.number({ error: `Enter ${what} as a number.` }).positive({ error: `${what[0].toUpperCase()}${what.slice(1)} must be above 0.` });
const optionalPositive = (what: string) => positive(what).optional();
const text = (what: string, max: number) =>
  z.string({ error: `Enter ${what}.` }).trim().min(1, { error: `Enter ${what}.` }).max(max, { error: `Use at most ${max} characters.` });

const hazardRow = z
  .object({
    reagent: z.string().trim().max(120).optional(),
    hStatements: z.string().max(200).optional(),
    pictograms: z.string().max(200).optional(),
    handling: z.string().max(500).optional(),
  })
  .superRefine((h, ctx) => {
    for (const c of splitCodes(h.hStatements ?? "")) if (!isHazardCode(c)) ctx.addIssue({ code: "custom", path: ["hStatements"], message: `${c} is not a GHS hazard statement code (like H314).` });
    for (const c of splitCodes(h.pictograms ?? "")) if (!isPictogramCode(c)) ctx.addIssue({ code: "custom", path: ["pictograms"], message: `${c} is not a GHS pictogram code (GHS01 to GHS09).` });
    if (!h.reagent && (h.hStatements || h.pictograms || h.handling)) ctx.addIssue({ code: "custom", path: ["reagent"], message: "Name the reagent these hazards belong to." });
  });

export const reactionSchema = z
  .object({
    name: text("a name", 120),
    speciesA: text("species A", 120),
    speciesB: text("species B", 120),
    coeffA: positive("the coefficient a"),
    coeffB: positive("the coefficient b"),
    rateLaw: z.enum(["1,0", "2,0", "1,1"], { error: "Choose a rate law." }),
    kRef: positive("the reference k"),
    TrefC: z.number({ error: "Enter the reference temperature in °C." }).min(0, { error: "Use 0 to 100 °C." }).max(100, { error: "Use 0 to 100 °C." }),
    EaKJ: z.number({ error: "Enter the activation energy in kJ/mol." }).min(0, { error: "The activation energy cannot be negative." }).max(400, { error: "Above 400 kJ/mol is not a lab-bench reaction." }),
    referenceSource: z.string().trim().max(500).optional(),
    measured: z.enum(MEASURED_QUANTITIES, { error: "Choose what is measured." }),
    conductivityStart: optionalPositive("the initial conductivity"),
    conductivityEnd: optionalPositive("the final conductivity"),
    epsilon: optionalPositive("the molar absorptivity"),
    pathCm: optionalPositive("the path length"),
    absorbingSpecies: z.enum(["A", "B"]).optional(),
    titrantMolL: optionalPositive("the titrant concentration"),
    aliquotMl: optionalPositive("the aliquot volume"),
    titratedSpecies: z.enum(["A", "B"]).optional(),
    titrant: z.string().trim().max(120).optional(),
    titrationRatio: optionalPositive("the mol of titrated species per mol of titrant"),
    quenchMolL: optionalPositive("the quench reagent's concentration"),
    quenchMl: optionalPositive("the quench volume"),
    quenchRatio: optionalPositive("the mol of titrated species per mol of quench reagent"),
    stocksA: z.string().max(200).optional(),
    stocksB: z.string().max(200).optional(),
    hazards: z.array(hazardRow).max(8).optional(),
  })
  .superRefine((r, ctx) => {
    const need = (field: keyof typeof r, message: string) => {
      if (r[field] === undefined) ctx.addIssue({ code: "custom", path: [field], message });
    };
    if (r.measured === "conductivity") {
      need("conductivityStart", "Conductivity needs the initial conductivity (mS/cm).");
      need("conductivityEnd", "Conductivity needs the final conductivity (mS/cm).");
    }
    if (r.measured === "absorbance") {
      need("epsilon", "Absorbance needs the molar absorptivity (L/(mol·cm)).");
      need("pathCm", "Absorbance needs the path length (cm).");
    }
    if (r.measured === "titration") {
      need("titrantMolL", "Titration needs the titrant concentration (mol/L).");
      need("aliquotMl", "Titration needs the aliquot volume (mL).");
      if ((r.quenchMolL === undefined) !== (r.quenchMl === undefined)) {
        need("quenchMolL", "A back-titration needs the quench reagent's concentration (mol/L) and its volume (mL).");
        need("quenchMl", "A back-titration needs the quench reagent's concentration (mol/L) and its volume (mL).");
      }
    }
    for (const key of ["stocksA", "stocksB"] as const) {
      for (const s of splitCodes(r[key] ?? "")) {
        if (!(Number(s) > 0)) ctx.addIssue({ code: "custom", path: [key], message: `${s} is not a concentration in mol/L (list numbers like 0.05, 0.1).` });
      }
    }
  });

export type ReactionInput = z.output<typeof reactionSchema>;

export function parseReactionForm(form: FormData) {
  return parseWithZod(form, { schema: reactionSchema });
}

function toAttributes(input: ReactionInput) {
  const [orderA, orderB] = input.rateLaw.split(",").map(Number);
  const calibration: Calibration = {};
  if (input.measured === "conductivity") Object.assign(calibration, { conductivityStart: input.conductivityStart, conductivityEnd: input.conductivityEnd });
  if (input.measured === "absorbance") Object.assign(calibration, { epsilon: input.epsilon, pathCm: input.pathCm, absorbingSpecies: input.absorbingSpecies ?? "A" });
  if (input.measured === "titration") Object.assign(calibration, { titrantMolL: input.titrantMolL, aliquotMl: input.aliquotMl, titratedSpecies: input.titratedSpecies ?? "B", titrant: input.titrant ?? "", titrationRatio: input.titrationRatio ?? 1, ...(input.quenchMolL && input.quenchMl ? { quenchMolL: input.quenchMolL, quenchMl: input.quenchMl, quenchRatio: input.quenchRatio ?? 1 } : {}) });
  const stocks: Stock[] = [];
  for (const [species, list, label] of [["A", input.stocksA, input.speciesA], ["B", input.stocksB, input.speciesB]] as const) {
    for (const s of splitCodes(list ?? "")) stocks.push({ species, label, concentrationMolL: Number(s) });
  }
  const hazards: Hazard[] = (input.hazards ?? [])
    .filter((h) => h.reagent)
    .map((h) => ({ reagent: h.reagent!, hStatements: splitCodes(h.hStatements ?? ""), pictograms: splitCodes(h.pictograms ?? ""), handling: h.handling ?? "" }));
  return {
    name: input.name,
    speciesA: input.speciesA,
    speciesB: input.speciesB,
    coeffA: input.coeffA,
    coeffB: input.coeffB,
    orderA,
    orderB,
    kRef: input.kRef,
    TrefC: input.TrefC,
    EaKJ: input.EaKJ,
    referenceSource: input.referenceSource ?? "",
    measured: input.measured,
    calibration,
    stocks,
    hazards,
  };
}

export async function createReactionSystem(actor: User, courseId: number, input: ReactionInput): Promise<{ ok: true; value: ReactionSystem } | { ok: false; errors: Record<string, string[]> }> {
  if (await ReactionSystem.findOne({ where: { courseId, name: input.name } })) return { ok: false, errors: { name: [`This course already has a reaction system called ${input.name}.`] } };
  const rs = await sequelize.transaction(async (transaction) => {
    const created = await ReactionSystem.create({ courseId, ...toAttributes(input) }, { transaction });
    await recordAudit({ actorId: actor.id, action: "reaction-system.created", entityType: "reaction_system", entityId: created.id, after: { name: input.name } }, transaction);
    return created;
  });
  return { ok: true, value: rs };
}

export function reactionSystemsOf(courseId: number) {
  return ReactionSystem.findAll({ where: { courseId }, order: [["name", "ASC"]] });
}
