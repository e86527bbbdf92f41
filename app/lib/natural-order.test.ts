import { describe, expect, it } from "vitest";
import { groupLabel, naturalCompare, naturalSort } from "./natural-order";

describe("natural order of names", () => {
  it("puts Group 2 before Group 10 (numbers by value, common practice, no source)", () => {
    const names = ["Group 10", "Group 2", "Group 1", "group 3", "Group 21"];
    expect(naturalSort(names, (n) => n)).toEqual(["Group 1", "Group 2", "group 3", "Group 10", "Group 21"]);
  });
  it("keeps plain text order for names without numbers", () => {
    expect(naturalCompare("Alpha", "Beta")).toBeLessThan(0);
    expect(naturalCompare("B10", "B9")).toBeGreaterThan(0);
  });
});

describe("group labels", () => {
  it("never doubles the word group", () => {
    expect(groupLabel("Group 1")).toBe("Group 1");
    expect(groupLabel("Red")).toBe("group Red");
  });
});
