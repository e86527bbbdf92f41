// What a bench sheet and the prep list show. A bench sheet holds nothing a student may not see
// (no reference k, activation energy or rubric); a student gets only their own group's sheet.
import { data } from "react-router";
import { Bench } from "../db/lab-sessions.server";
import { Group } from "../db/groups.server";
import type { SessionAccess } from "./sessions.server";
import { reactionForDesign, sessionForDesign } from "./sessions.server";
import { mixingVolumes, prepTotals, samplingPlan, type MixingVolumes } from "~/lib/planning/dilution";
import { secondsToTarget } from "~/lib/planning/feed-design";
import { HAZARD_STATEMENTS, PICTOGRAMS } from "~/lib/planning/hazards";

export type Paper = "a4" | "letter";
export const paperOf = (url: URL): Paper => (url.searchParams.get("paper") === "letter" ? "letter" : "a4");

const MEASURED_UPLOAD: Record<string, string> = {
  conductivity: "conductivity in mS/cm",
  absorbance: "absorbance (no unit)",
  titration: "titre volume in mL",
  concentration: "concentration of A in mol/L",
};

function hazardsOf(access: SessionAccess) {
  return access.reaction.hazards.map((h) => ({
    reagent: h.reagent,
    statements: h.hStatements.map((c) => `${c}${HAZARD_STATEMENTS[c] ? ` ${HAZARD_STATEMENTS[c]}` : ""}`),
    pictograms: h.pictograms.map((c) => `${c} (${PICTOGRAMS[c] ?? "see the safety data sheet"})`),
    handling: h.handling,
  }));
}

export type Hazards = ReturnType<typeof hazardsOf>;

function planMinutes(expected: number, available: number, intervalS: number) {
  if (!Number.isFinite(expected)) return available;
  const wanted = Math.max(1.5 * expected, (8 * intervalS) / 60);
  return Math.min(available, Math.ceil(wanted / 5) * 5);
}

function sheetFor(access: SessionAccess, bench: Bench & { group?: Group | null }) {
  const { session, reaction } = access;
  const volumes = mixingVolumes(bench, session);
  const available = session.slotMinutes - session.setupMinutes;
  // Figures from the reference k (time to target, a plan cut to it) would let a student work k
  // out: their sheet samples over the whole time left after set-up, the same plan on every bench.
  const seconds = access.staff ? secondsToTarget(reactionForDesign(reaction), bench, session.targetConversion) : NaN;
  return {
    benchId: bench.id,
    label: bench.label,
    group: bench.group?.name ?? null,
    groupId: bench.groupId,
    CA0: bench.CA0,
    CB0: bench.CB0,
    temperatureC: bench.temperatureC,
    volumes,
    expectedMinutes: Number.isFinite(seconds) ? seconds / 60 : null,
    // sample until well past the target (1.5 times its predicted time), inside the slot
    planMinutes: planMinutes(seconds / 60, available, session.samplingIntervalS),
    samples: samplingPlan(session.samplingIntervalS, planMinutes(seconds / 60, available, session.samplingIntervalS)),
  };
}

function common(access: SessionAccess) {
  const { session, reaction, course } = access;
  return {
    course: { id: course.id, code: course.code, title: course.title },
    session: {
      id: session.id,
      title: session.title,
      date: session.date,
      slotMinutes: session.slotMinutes,
      setupMinutes: session.setupMinutes,
      reactorVolumeMl: session.reactorVolumeMl,
      stockAMolL: session.stockAMolL,
      stockBMolL: session.stockBMolL,
      samplingIntervalS: session.samplingIntervalS,
      targetConversion: session.targetConversion,
      deadline: session.deadline ? session.deadline.toISOString() : null,
    },
    reaction: {
      name: reaction.name,
      speciesA: reaction.speciesA,
      speciesB: reaction.speciesB,
      a: reaction.coeffA,
      b: reaction.coeffB,
      measured: reaction.measured,
      upload: MEASURED_UPLOAD[reaction.measured] ?? reaction.measured,
    },
    hazards: hazardsOf(access),
  };
}

/** Every bench sheet of the session (staff). */
export async function allSheets(access: SessionAccess) {
  if (!access.staff) throw data({ message: "Students open their own bench sheet from the practical's page." }, { status: 403 });
  const benches = await Bench.findAll({ where: { sessionId: access.session.id }, include: [{ model: Group, as: "group" }], order: [["position", "ASC"]] });
  return { ...common(access), sheets: benches.map((b) => sheetFor(access, b)) };
}

/** One bench sheet: staff any; a student only their own group's (404 otherwise, so others' benches do not leak). */
export async function oneSheet(access: SessionAccess, benchId: number) {
  const bench = await Bench.findOne({ where: { id: benchId, sessionId: access.session.id }, include: [{ model: Group, as: "group" }] });
  if (!bench || (!access.staff && (bench.groupId === null || bench.groupId !== access.myGroupId))) {
    throw data({ message: "There is no bench sheet of yours at this address." }, { status: 404 });
  }
  return { ...common(access), sheets: [sheetFor(access, bench)] };
}

export type SheetsData = Awaited<ReturnType<typeof allSheets>>;

/** The technician's prep list: per bench volumes, totals with a margin (staff). */
export async function prepList(access: SessionAccess, marginPct: number) {
  if (!access.staff) throw data({ message: "The prep list is for staff." }, { status: 403 });
  const { session } = access;
  const benches = await Bench.findAll({ where: { sessionId: session.id }, order: [["position", "ASC"]] });
  const rows = benches.map((b) => ({ label: b.label, CA0: b.CA0, CB0: b.CB0, temperatureC: b.temperatureC, volumes: mixingVolumes(b, session) as MixingVolumes }));
  return { ...common(access), marginPct, rows, totals: prepTotals(rows.map((r) => r.volumes), marginPct) };
}

export type PrepData = Awaited<ReturnType<typeof prepList>>;
