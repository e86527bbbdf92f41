// Weighted means worked by hand below (arithmetic written out in each comment).
import { describe, expect, it } from "vitest";
import { courseTotal } from "./course-total";

const P = [
  { id: 1, weight: 1, due: true },
  { id: 2, weight: 2, due: true },
  { id: 3, weight: 1, due: false },
];

describe("courseTotal", () => {
  it("weights each mark: (80·1 + 65·2) / 3 = 70", () => {
    expect(courseTotal(P, { 1: 80, 2: 65 }, false)).toEqual({ total: 70, missing: 0, countedWeight: 3 });
  });

  it("leaves missing work out unless told: only practical 1 counts, total 80", () => {
    expect(courseTotal(P, { 1: 80, 2: null }, false)).toEqual({ total: 80, missing: 1, countedWeight: 1 });
  });

  it("counts missing due work as zero when told: (80·1 + 0·2) / 3 = 26.67", () => {
    expect(courseTotal(P, { 1: 80 }, true)).toEqual({ total: 26.67, missing: 1, countedWeight: 3 });
  });

  it("never counts work not yet due as zero, and counts a mark in it once there is one", () => {
    expect(courseTotal(P, { 1: 80, 2: 65 }, true).total).toBe(70);
    // (80 + 130 + 50) / 4 = 65
    expect(courseTotal(P, { 1: 80, 2: 65, 3: 50 }, true).total).toBe(65);
  });

  it("ignores weight 0 and gives null when nothing counts", () => {
    expect(courseTotal([{ id: 1, weight: 0, due: true }], { 1: 90 }, true)).toEqual({ total: null, missing: 0, countedWeight: 0 });
    expect(courseTotal(P, {}, false)).toEqual({ total: null, missing: 2, countedWeight: 0 });
  });
});
