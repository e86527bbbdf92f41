// Signals converted with the practical's own calibration (issue 16): titres, conductivity with a
// late first reading or a measured final reading, the analysis check against like, imprecise
// runs. Each file is made here from the odex ground truth (bench-truth.ts: the rate equations
// integrated numerically, not the engine's closed forms), then goes through a real upload and
// the marking job. Honest files get full marks.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as upload } from "~/routes/api/group-submissions";
import { action as preview } from "~/routes/api/submission-preview";
import { Submission } from "~/.server/db/submissions.server";
import { runJobsUntilIdle } from "~/.server/jobs/worker.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call } from "./helpers";
import { makePractical, uploadRequest, type Practical } from "./practical-fixture";
import { benchTruth, everyS, sig4 } from "./bench-truth";

let p: Practical;
let cookies: string[];

beforeAll(async () => {
  p = await makePractical("SIGNALS-T", { groups: 3 });
  cookies = await Promise.all(p.students.map((s) => p.cookie(s)));
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

type File = { bytes: Uint8Array | string; name: string; type?: string };

async function send(g: number, file: File, fields: Record<string, string> = {}) {
  const res: Response = await call(upload, uploadRequest(`/api/groups/${p.groups[g].id}/submissions`, cookies[g], file, fields), { groupId: String(p.groups[g].id) });
  return { status: res.status, body: (await res.json()) as any };
}

async function previewOf(g: number, file: File, fields: Record<string, string> = {}) {
  const res: Response = await call(preview, uploadRequest(`/api/groups/${p.groups[g].id}/submissions/preview`, cookies[g], file, fields), { groupId: String(p.groups[g].id) });
  return { status: res.status, body: (await res.json()) as any };
}

/** Uploads, runs the marking job, and returns the stored version (never left queued). */
async function marked(g: number, file: File, fields: Record<string, string> = {}) {
  const r = await send(g, file, fields);
  expect(r.status, JSON.stringify(r.body)).toBe(202);
  await runJobsUntilIdle();
  const s = (await Submission.findByPk(r.body.id))!;
  expect(s.status, s.markingError ?? "").toBe("marked");
  return s;
}

const csv = (header: string, rows: Array<[number | string, number | string]>) => [header, ...rows.map(([t, v]) => `${t},${v}`)].join("\n") + "\n";

describe("titration: titres in mL converted with the practical's calibration", () => {
  // Bench 1: A + B, CA0 0.02, CB0 0.03 mol/L at 25 degC; hydroxide (B) titrated in 10 mL aliquots
  // with 0.02 mol/L acid, one mol of B per mol of titrant. Readings every 2 min for 40 min.
  const direct = { titrantMolL: 0.02, aliquotMl: 10, titratedSpecies: "B" as const, titrationRatio: 1 };
  const truth = () => {
    const t = benchTruth(p, p.benches[0], everyS(120, 2400));
    const bench = p.benches[0];
    // CB from the integrated CA by the reaction's stoichiometry (nu = 1), in mol/L
    const CB = t.CA.map((c) => bench.CB0 - (bench.CA0 - c));
    return { ...t, CB };
  };
  // the bench's own arithmetic, written out here (amount of B in the aliquot = amount of titrant used;
  // common practice, no source): titre/mL = CB * aliquot / c(titrant)
  const titreOf = (CB: number) => Math.round(((CB * 10) / 0.02) * 100) / 100;

  beforeAll(async () => {
    await p.system.update({ measured: "titration", calibration: direct });
  });

  test("titres headed `titre (mL)` are converted to [B]: full marks, the preview names the arithmetic", async () => {
    const t = truth();
    const file = { bytes: csv("t (s),titre (mL)", t.t.map((s, i) => [s, titreOf(t.CB[i]).toFixed(2)])), name: "titres.csv" };
    const pre = await previewOf(0, file);
    expect(pre.status).toBe(200);
    expect(pre.body.notes.join(" ")).toMatch(/Read as titres in mL \(column B \(titre\) is in mL\) and converted to the concentration of B with the practical's titration: \[B\] = 0\.02 mol\/L × titre \/ 10 mL aliquot\./);
    expect(pre.body.fit.flags.map((f: { code: string }) => f.code)).not.toContain("feed-mismatch");
    const s = await marked(0, file, { reportedK: String(t.k) });
    expect(s.checks!.notes!.join(" ")).toMatch(/Read as titres in mL/);
    expect(Math.abs(s.checks!.kMarking / t.k - 1)).toBeLessThan(0.02);
    expect(s.autoMark).toBe(100);
  });

  test("titres without a unit are told from concentrations by their size (15 mL, not 15 mol/L): full marks", async () => {
    const t = truth();
    const s = await marked(0, { bytes: csv("time,reading", t.t.map((x, i) => [x, titreOf(t.CB[i]).toFixed(2)])), name: "plain.csv" }, { reportedK: String(t.k) });
    expect(s.checks!.notes!.join(" ")).toMatch(/Read as titres in mL \(no unit in column B \(reading\); its first reading, 15, is the size of a titre in mL/);
    expect(s.autoMark).toBe(100);
  });

  test("a group that converted its titres itself (`CB (mol/L)`) keeps working: nothing converted, full marks", async () => {
    const t = truth();
    const file = { bytes: csv("t (s),CB (mol/L)", t.t.map((x, i) => [x, sig4(t.CB[i])])), name: "converted.csv" };
    const pre = await previewOf(0, file);
    expect(pre.body.notes.join(" ")).toMatch(/Read as concentrations of B you worked out yourself \(column B \(CB\) is in mol\/L\), not as titres/);
    const s = await marked(0, file, { reportedK: String(t.k) });
    expect(s.autoMark).toBe(100);
    // and by size alone, with no unit: 0.03 is a concentration for this feed
    const bare = await marked(0, { bytes: csv("time,reading", t.t.map((x, i) => [x, sig4(t.CB[i])])), name: "bare.csv" }, { reportedK: String(t.k) });
    expect(bare.checks!.notes!.join(" ")).toMatch(/Read as concentrations of B/);
    expect(bare.autoMark).toBe(100);
  });

  test("quenched in a known excess of acid and back-titrated with base: the back-titration arithmetic, full marks", async () => {
    // each 10 mL aliquot is run into 10 mL of 0.05 mol/L acid; the acid left is titrated with 0.02 mol/L base
    await p.system.update({ calibration: { ...direct, quenchMolL: 0.05, quenchMl: 10, quenchRatio: 1 } });
    try {
      const t = truth();
      // acid left = acid added - B in the aliquot; titre = acid left / c(base) (common practice, no source)
      const back = (CB: number) => Math.round(((0.05 * 10 - CB * 10) / 0.02) * 100) / 100;
      const file = { bytes: csv("t (s),titre (mL)", t.t.map((x, i) => [x, back(t.CB[i]).toFixed(2)])), name: "back.csv" };
      const pre = await previewOf(0, file);
      expect(pre.body.notes.join(" ")).toMatch(/\[B\] = \(0\.05 mol\/L × 10 mL quench − 0\.02 mol\/L × titre\) \/ 10 mL aliquot \(back-titration\)/);
      const s = await marked(0, file, { reportedK: String(t.k) });
      // rising titres are falling [B]: the run is read the right way round
      expect(Math.abs(s.checks!.kMarking / t.k - 1)).toBeLessThan(0.02);
      expect(s.autoMark).toBe(100);
    } finally {
      await p.system.update({ calibration: direct });
    }
  });
});
