import { describe, expect, it } from "vitest";
import { formatDateTime, formatDay } from "./dates";

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
