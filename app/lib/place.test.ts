import { describe, expect, it } from "vitest";
import { trailFor } from "./place";

describe("trailFor", () => {
  const course = { id: 7, code: "CHEM 210" };
  const practical = { id: 31, title: "Ester hydrolysis" };

  it("leads from the dashboard through the course and practical to the page", () => {
    expect(trailFor("Prep list", course, practical)).toEqual([
      { label: "Dashboard", to: "/dashboard" },
      { label: "CHEM 210", to: "/courses/7" },
      { label: "Ester hydrolysis", to: "/sessions/31" },
      { label: "Prep list" },
    ]);
  });

  it("does not link the page itself when it is the course's or practical's own page", () => {
    expect(trailFor(null, course, practical).at(-1)).toEqual({ label: "Ester hydrolysis" });
    expect(trailFor(null, course)).toEqual([{ label: "Dashboard", to: "/dashboard" }, { label: "CHEM 210" }]);
  });

  it("puts steps between the practical and the page, e.g. the review list before one upload", () => {
    const t = trailFor("Version 2", course, practical, [{ label: "Review", to: "/sessions/31/review" }]);
    expect(t.map((c) => c.label)).toEqual(["Dashboard", "CHEM 210", "Ester hydrolysis", "Review", "Version 2"]);
    expect(t[3].to).toBe("/sessions/31/review");
  });

  it("works for pages outside any course", () => {
    expect(trailFor("Account")).toEqual([{ label: "Dashboard", to: "/dashboard" }, { label: "Account" }]);
  });
});
