// A course's time zone (issue 18): deadlines are entered and shown on the lab's clock and stored
// as the right UTC moment; a time the clocks skip is refused beside the field; the assignment
// e-mail names the deadline on that clock. Zone facts: IANA rules for 2026-27 (from memory): Berlin
// is UTC+1 in winter, and the EU skips 02:00-03:00 on the last Sunday of March (28 March 2027).
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { action as courseAction, loader as coursePage } from "~/routes/courses/course";
import { action as sessionAction, loader as sessionPage } from "~/routes/sessions/session";
import { AuditEntry } from "~/.server/db/models.server";
import { LabSession } from "~/.server/db/lab-sessions.server";
import { closeSequelize } from "~/.server/db/sequelize.server";
import { movedDeadline } from "~/.server/planning/reuse.server";
import { call, payloadOf, request, statusOf, waitForMail } from "./helpers";
import { makePractical, type Practical } from "./practical-fixture";

let p: Practical;
let cookie: string;

beforeAll(async () => {
  p = await makePractical("ZONE-T", { groups: 1 });
  cookie = await p.cookie(p.instructor);
});
afterAll(async () => {
  await p.course.destroy();
  await closeSequelize();
});

const details = (deadline: string) => ({
  intent: "edit-details", title: p.session.title, date: "2026-12-10", slotMinutes: "180", setupMinutes: "30", samplingIntervalS: "60", deadline,
});
const params = () => ({ sessionId: String(p.session.id) });

describe("a course's clock", () => {
  test("the instructor sets the zone (audited); an unknown zone is refused beside the field", async () => {
    const bad = await call(courseAction, request(`/courses/${p.course.id}`, { cookie, form: { intent: "time-zone", timeZone: "Mars/Olympus" } }), { courseId: String(p.course.id) });
    expect(statusOf(bad)).toBe(400);
    expect(payloadOf(bad).errors.timeZone).toMatch(/Choose a time zone/);
    const ok = await call(courseAction, request(`/courses/${p.course.id}`, { cookie, form: { intent: "time-zone", timeZone: "Europe/Berlin" } }), { courseId: String(p.course.id) });
    expect(statusOf(ok)).toBe(200);
    await p.course.reload();
    expect(p.course.timeZone).toBe("Europe/Berlin");
    expect(await AuditEntry.findOne({ where: { action: "course.time-zone-changed", entityId: String(p.course.id) } })).not.toBeNull();
    const page = payloadOf(await call(coursePage, request(`/courses/${p.course.id}`, { cookie }), { courseId: String(p.course.id) }));
    expect(page.timeZones).toContain("Europe/Berlin");
  });

  test("a deadline typed as 17:00 is 17:00 in Berlin (16:00 UTC) and the form shows it back as typed", async () => {
    const r = await call(sessionAction, request(`/sessions/${p.session.id}`, { cookie, form: details("2026-12-10T17:00") }), params());
    expect(statusOf(r)).toBe(200);
    expect((await LabSession.findByPk(p.session.id))!.deadline!.toISOString()).toBe("2026-12-10T16:00:00.000Z");
    const page = payloadOf(await call(sessionPage, request(`/sessions/${p.session.id}`, { cookie }), params()));
    expect(page.course.timeZone).toBe("Europe/Berlin");
  });

  test("a time the clocks skip is refused beside the deadline field, and the stored deadline stays", async () => {
    const r = await call(sessionAction, request(`/sessions/${p.session.id}`, { cookie, form: details("2027-03-28T02:30") }), params());
    expect(statusOf(r)).toBe(400);
    expect(JSON.stringify(payloadOf(r).details)).toMatch(/clocks skip that hour/);
    expect((await LabSession.findByPk(p.session.id))!.deadline!.toISOString()).toBe("2026-12-10T16:00:00.000Z");
  });

  test("the assignment e-mail gives the deadline on the course's clock", async () => {
    const r = await call(sessionAction, request(`/sessions/${p.session.id}`, { cookie, form: { intent: "notify" } }), params());
    expect(statusOf(r)).toBe(200);
    const [mail] = await waitForMail(p.students[0].email);
    expect(mail.text).toContain("Upload your readings by Thu, 10 Dec 2026, 17:00 CET.");
  });

  test("a copied deadline keeps its wall time across a clock change", () => {
    // 17:00 CET on 10 Dec 2026, moved 182 days, is 17:00 CEST on 10 Jun 2027 (15:00 UTC, not 16:00)
    const moved = movedDeadline(new Date("2026-12-10T16:00:00Z"), 182, { from: "Europe/Berlin", to: "Europe/Berlin" });
    expect(moved.toISOString()).toBe("2027-06-10T15:00:00.000Z");
    expect(movedDeadline(new Date("2026-12-10T16:00:00Z"), 7, { from: "UTC", to: "UTC" }).toISOString()).toBe("2026-12-17T16:00:00.000Z");
  });
});
