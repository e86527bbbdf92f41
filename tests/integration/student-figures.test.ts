// A student must not be able to work the reference k out of what they are shown (issue 15): the
// predicted time to the target conversion is the closed form from kRef at the bench's temperature,
// so inverting it gives k. Every number in the student's session answer and bench sheet is tried
// as a time (minutes or seconds) and as a rate constant against the figures only staff may have.
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { loader as sessionApi } from "~/routes/api/session";
import { loader as benchSheet } from "~/routes/sessions/bench-sheet";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { call, request } from "./helpers";
import { makePractical, REFERENCE, type Practical } from "./practical-fixture";

let p: Practical;
beforeAll(async () => {
  p = await makePractical("KREF-T", { groups: 3 });
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

function numbersIn(value: unknown, out: number[] = []): number[] {
  if (typeof value === "number" && Number.isFinite(value)) out.push(value);
  else if (Array.isArray(value)) for (const v of value) numbersIn(v, out);
  else if (value && typeof value === "object") for (const v of Object.values(value)) numbersIn(v, out);
  return out;
}
const close = (a: number, b: number) => Math.abs(a - b) <= 1e-6 * Math.max(Math.abs(a), Math.abs(b));

async function sessionAs(cookie: string) {
  const res = (await call(sessionApi, request(`/api/sessions/${p.session.id}`, { cookie }), { sessionId: String(p.session.id) })) as Response;
  expect(res.status).toBe(200);
  return (await res.json()) as any;
}
async function sheetAs(cookie: string, benchId: number) {
  return call(benchSheet, request(`/sessions/${p.session.id}/benches/${benchId}/sheet`, { cookie }), { sessionId: String(p.session.id), benchId: String(benchId) });
}

describe("no figure from the reference k reaches a student", () => {
  test("session API and bench sheet: staff keep the predictions, a student's numbers invert to nothing", async () => {
    const staff = await p.cookie(p.instructor);
    const staffView = await sessionAs(staff);
    // Secrets: the reference itself, k at each bench's temperature, and every prediction made from them.
    const secrets: number[] = [REFERENCE.kRef];
    expect(JSON.stringify(await sessionAs(await p.cookie(p.students[0])))).not.toMatch(/reference|EaKJ|kAtT|rubric/);
    for (const b of staffView.benches) {
      expect(b.predicted.minutesToTarget).toBeGreaterThan(0);
      const sheet = (await sheetAs(staff, b.id)) as any;
      expect(sheet.sheets[0].expectedMinutes).toBeCloseTo(b.predicted.minutesToTarget, 9);
      secrets.push(b.reference.kAtT, b.predicted.minutesToTarget, b.predicted.minutesToTarget * 60, sheet.sheets[0].expectedMinutes);
    }
    const plans = new Set<number>();
    for (let i = 0; i < p.students.length; i++) {
      const cookie = await p.cookie(p.students[i]);
      const view = await sessionAs(cookie);
      expect(view.benches).toHaveLength(1);
      expect(view.benches[0].predicted.minutesToTarget).toBeNull();
      const sheet = (await sheetAs(cookie, p.benches[i].id)) as any;
      expect(sheet.sheets[0].expectedMinutes).toBeNull();
      plans.add(sheet.sheets[0].planMinutes);
      for (const x of [...numbersIn(view), ...numbersIn(sheet)]) {
        for (const s of secrets) expect(close(x, s), `student sees ${x}, equal to a figure from the reference (${s})`).toBe(false);
      }
    }
    // The sampling plan comes from the slot: the same for every bench.
    expect([...plans]).toEqual([p.session.slotMinutes - p.session.setupMinutes]);
  });
});
