// Zone rules checked against the IANA time zone database's rules for 2026 (from memory): the EU
// changes clocks on the last Sunday of March and October at 01:00 UTC (29 March, 25 October
// 2026); the US on the second Sunday of March and the first of November at 02:00 local (8 March,
// 1 November 2026); Kolkata is UTC+5:30 all year.
import { describe, expect, test } from "vitest";
import { fromWallTime, isTimeZone, offsetMinutes, timeZoneNames, wallTime } from "./time-zone";

describe("course time zones", () => {
  test("offsets in winter and summer", () => {
    expect(offsetMinutes(new Date("2026-01-15T12:00:00Z"), "Europe/Berlin")).toBe(60);
    expect(offsetMinutes(new Date("2026-07-15T12:00:00Z"), "Europe/Berlin")).toBe(120);
    expect(offsetMinutes(new Date("2026-01-15T12:00:00Z"), "America/New_York")).toBe(-300);
    expect(offsetMinutes(new Date("2026-07-15T12:00:00Z"), "America/New_York")).toBe(-240);
    expect(offsetMinutes(new Date("2026-07-15T12:00:00Z"), "Asia/Kolkata")).toBe(330);
    expect(offsetMinutes(new Date("2026-07-15T12:00:00Z"), "UTC")).toBe(0);
  });

  test("a lab's wall time becomes the right UTC moment and reads back the same", () => {
    const cases: Array<[string, string, string]> = [
      ["2026-12-10T17:00", "Europe/Berlin", "2026-12-10T16:00:00.000Z"],
      ["2026-06-10T17:00", "Europe/Berlin", "2026-06-10T15:00:00.000Z"],
      ["2026-03-09T09:30", "America/New_York", "2026-03-09T13:30:00.000Z"],
      ["2026-03-06T09:30", "America/New_York", "2026-03-06T14:30:00.000Z"],
      ["2026-08-01T23:45", "Asia/Kolkata", "2026-08-01T18:15:00.000Z"],
      ["2026-08-01T23:45", "UTC", "2026-08-01T23:45:00.000Z"],
    ];
    for (const [wall, zone, utc] of cases) {
      const r = fromWallTime(wall, zone);
      expect(r.ok && r.at.toISOString(), `${wall} ${zone}`).toBe(utc);
      expect(wallTime(new Date(utc), zone)).toBe(wall);
    }
  });

  test("the hour skipped in spring is refused; the hour repeated in autumn is its first pass", () => {
    expect(fromWallTime("2026-03-29T02:30", "Europe/Berlin")).toEqual({ ok: false, reason: "gap" });
    expect(fromWallTime("2026-03-08T02:30", "America/New_York")).toEqual({ ok: false, reason: "gap" });
    const twice = fromWallTime("2026-10-25T02:30", "Europe/Berlin");
    expect(twice.ok && twice.at.toISOString()).toBe("2026-10-25T00:30:00.000Z"); // still summer time (+2)
    expect(fromWallTime("10 Dec 2026", "UTC")).toEqual({ ok: false, reason: "format" });
  });

  test("zone names", () => {
    expect(isTimeZone("Europe/Berlin")).toBe(true);
    expect(isTimeZone("UTC")).toBe(true);
    expect(isTimeZone("Mars/Olympus")).toBe(false);
    expect(isTimeZone("")).toBe(false);
    const names = timeZoneNames();
    expect(names[0]).toBe("UTC");
    expect(names).toContain("America/New_York");
  });
});
