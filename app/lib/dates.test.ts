import { describe, expect, it } from "vitest";
import { formatDateTime, formatDay, isRealDateTime, isRealDay } from "./dates";

describe("one date style", () => {
  it("writes a moment in the given zone with the zone's name (offsets from memory: Berlin is UTC+1 in December)", () => {
    expect(formatDateTime("2026-12-03T14:05:00Z")).toBe("Thu, 3 Dec 2026, 14:05 UTC");
    expect(formatDateTime("2026-12-03T14:05:00Z", "Europe/Berlin")).toBe("Thu, 3 Dec 2026, 15:05 CET");
  });
  it("writes a calendar day without a time, and a dash for nothing", () => {
    expect(formatDay("2026-12-03")).toBe("Thu, 3 Dec 2026");
    expect(formatDateTime(null)).toBe("—");
  });
});

describe("real days and times (the Gregorian calendar: 2028 is a leap year, 2027 is not)", () => {
  it("refuses 31 February and 30 February, keeps 29 February in a leap year", () => {
    expect(isRealDay("2027-02-31")).toBe(false);
    expect(isRealDay("2027-02-29")).toBe(false);
    expect(isRealDay("2028-02-29")).toBe(true);
    expect(isRealDay("2027-13-01")).toBe(false);
  });
  it("refuses trailing text and impossible hours", () => {
    expect(isRealDateTime("2027-02-17T17:00")).toBe(true);
    expect(isRealDateTime("2027-02-17T17:00:30")).toBe(true);
    expect(isRealDateTime("2027-02-17T17:00 tomorrow")).toBe(false);
    expect(isRealDateTime("2027-02-17T25:00")).toBe(false);
    expect(isRealDateTime("2027-02-31T17:00")).toBe(false);
  });
});
