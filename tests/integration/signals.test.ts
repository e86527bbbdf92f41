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
import { normalSource } from "~/lib/kinetics/synthetic";

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

describe("conductivity: S0 and S∞ as the group measured them", () => {
  // Bench 2: A + B, CA0 0.02, CB0 0.035 mol/L at 30 degC. An invented cell reads 2.400 mS/cm at
  // mixing and 0.950 mS/cm when A is used up, linear in the extent of reaction (the conductivity
  // of a mixture is the sum of its ions' contributions; common practice, no source).
  const S0 = 2.4;
  const SINF = 0.95;
  const kappa = (CA: number) => S0 + ((SINF - S0) * (p.benches[1].CA0 - CA)) / p.benches[1].CA0;
  const rowsOf = (times: number[]) => {
    const t = benchTruth(p, p.benches[1], times);
    return { k: t.k, rows: t.t.map((s, i) => [s, kappa(t.CA[i]).toFixed(3)] as [number, string]) };
  };
  const codes = (s: Submission) => s.flags.map((f) => f.code);

  beforeAll(async () => {
    await p.system.update({ measured: "conductivity", calibration: {} });
  });

  test("first reading 45 s after mixing (clock started at mixing): S0 is fitted, not the first reading; no wild reading; full marks", async () => {
    const { k, rows } = rowsOf(everyS(90, 2700).map((t) => t + 45));
    const file = { bytes: csv("t (s),kappa (mS/cm)", rows), name: "late-first.csv" };
    const pre = await previewOf(1, file);
    expect(pre.body.notes.join(" ")).toMatch(/The first reading \(row 2\) came 45 s after mixing: the start value S0 is fitted with k, not taken from that reading\./);
    const s = await marked(1, file, { reportedK: String(k) });
    expect(codes(s)).not.toContain("outlier");
    const fit = s.fit as { signalStart: { S0: number }; kSource: string };
    expect(fit.kSource).toBe("curve");
    expect(Math.abs(fit.signalStart.S0 - S0)).toBeLessThan(0.005);
    expect(Math.abs(s.checks!.kMarking / k - 1)).toBeLessThan(0.02);
    expect(s.autoMark).toBe(100);
  });

  test("a row marked ∞ is S∞ and no reading of the run: full marks", async () => {
    const { k, rows } = rowsOf(everyS(120, 2400));
    const file = { bytes: csv("t (s),kappa (mS/cm)", [...rows, ["∞", SINF.toFixed(3)]]), name: "infinity.csv" };
    const s = await marked(1, file, { reportedK: String(k) });
    expect(s.readings!.final).toEqual({ row: rows.length + 2, value: SINF, label: "∞" });
    expect(s.problems).toEqual([]);
    expect(s.checks!.notes!.join(" ")).toMatch(new RegExp(`Row ${rows.length + 2} \\("∞"\\) is the final reading: S∞ = 0\\.95, kept out of the straight line\\.`));
    const fit = s.fit as { nonlinear: { Sinf?: unknown }; line: { rows: number[] }; n: number };
    expect(fit.nonlinear.Sinf).toBeUndefined(); // known, not fitted
    expect(fit.line.rows.length).toBeLessThanOrEqual(rows.length);
    expect(s.autoMark).toBe(100);
    // the same with "inf" and "final"
    for (const label of ["inf", "final"]) {
      const again = await marked(1, { bytes: csv("t (s),kappa (mS/cm)", [...rows, [label, SINF.toFixed(3)]]), name: `${label}.csv` }, { reportedK: String(k) });
      expect(again.readings!.final?.label).toBe(label);
      expect(again.autoMark).toBe(100);
    }
  });

  test("a reading taken the next morning is S∞, kept out of the straight line: the group's own k scores in full", async () => {
    const { k, rows } = rowsOf(everyS(120, 2400));
    const morning: [number, string] = [18 * 3600, kappa(benchTruth(p, p.benches[1], [18 * 3600]).CA[0]).toFixed(3)];
    const s = await marked(1, { bytes: csv("t (s),kappa (mS/cm)", [...rows, morning]), name: "next-morning.csv" }, { reportedK: String(k) });
    expect(s.checks!.notes!.join(" ")).toMatch(/Row 23, at 64800 s, was taken long after the other readings \(the last at 2400 s\): it is read as the final reading, S∞ = 0\.95, and kept out of the straight line\./);
    expect(s.checks!.rowNumbers).not.toContain(23);
    expect(s.checks!.analysis.band).toBe("full");
    expect(s.autoMark).toBe(100);
  });

  test("no final reading in the file: the practical's stored final conductivity is S∞; full marks", async () => {
    await p.system.update({ calibration: { conductivityStart: S0, conductivityEnd: SINF } });
    try {
      const { k, rows } = rowsOf(everyS(120, 2400));
      const s = await marked(1, { bytes: csv("t (s),kappa (mS/cm)", rows), name: "stored-end.csv" }, { reportedK: String(k) });
      expect(s.checks!.notes!.join(" ")).toMatch(/No final reading in the file: S∞ = 0\.95, the final conductivity the practical stores\./);
      const fit = s.fit as { nonlinear: { Sinf?: unknown } };
      expect(fit.nonlinear.Sinf).toBeUndefined();
      expect(s.autoMark).toBe(100);
    } finally {
      await p.system.update({ calibration: {} });
    }
  });
});

describe("the analysis check compares like with like", () => {
  // Bench 1 over 40 min (97.5 % of A reacted), CA read with a seeded noise of 0.3 mmol/L (1.5 % of
  // CA0): on this draw the unweighted straight line is 32 % above the truth while a curve fit is
  // within 1 % of it (the transform magnifies late readings' noise).
  const noisy = () => {
    const t = benchTruth(p, p.benches[0], everyS(120, 2400));
    const rnd = normalSource(9);
    return { k: t.k, rows: t.t.map((s, i) => [s, sig4(t.CA[i] + 0.0003 * rnd())] as [number, string]) };
  };

  test("a k the group made with a curve fit is judged against the engine's curve fit: full marks; a straight-line k against the straight line", async () => {
    const { k, rows } = noisy();
    const file = { bytes: csv("t (s),CA (mol/L)", rows), name: "curve-fit.csv" };
    const s = await marked(0, file, { measured: "concentrationA", reportedK: String(k), reportedMethod: "curve-fit" });
    const fit = s.fit as { line: { k: number }; nonlinear: { k: number } };
    // the precondition that makes this a test: the hand line is far from the truth, the curve is not
    expect(Math.abs(fit.line.k / k - 1)).toBeGreaterThan(0.25);
    expect(Math.abs(fit.nonlinear.k / k - 1)).toBeLessThan(0.02);
    expect(s.checks!.analysisAgainst).toBe("curve");
    expect(s.checks!.analysis.band).toBe("full");
    expect(s.feedback.join(" ")).toMatch(/matches a curve fitted to your own readings/);
    expect(s.autoMark).toBe(100);
    // the group's own straight line copied as its k, named as a straight line: judged against that line
    const line = await marked(0, file, { measured: "concentrationA", reportedK: String(fit.line.k), reportedMethod: "ln[(CB*CA0)/(CB0*CA)]" });
    expect(line.checks!.analysisAgainst).toBe("line");
    expect(line.checks!.analysis.band).toBe("full");
  });
});
