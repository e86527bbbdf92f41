// The filter boxes' little language, case by case (our own syntax: the expected rules follow
// from its definition in table-filter.ts, no outside source).
import { describe, expect, it } from "vitest";
import { parseFilter, passes } from "./table-filter";

describe("parseFilter", () => {
  it("reads comparisons with a true minus, a decimal comma and ≤ / ≥", () => {
    expect(parseFilter("> 60")).toEqual({ kind: "compare", op: ">", value: 60 });
    expect(parseFilter("<=0,5")).toEqual({ kind: "compare", op: "<=", value: 0.5 });
    expect(parseFilter("≥ −3.5")).toEqual({ kind: "compare", op: ">=", value: -3.5 });
    expect(parseFilter("< 1e-4")).toEqual({ kind: "compare", op: "<", value: 1e-4 });
  });

  it("reads ranges either way round, ends included", () => {
    expect(parseFilter("70 to 50")).toEqual({ kind: "range", low: 50, high: 70 });
    expect(parseFilter("−5..5")).toEqual({ kind: "range", low: -5, high: 5 });
  });

  it("reads missing, and keeps anything else as text", () => {
    expect(parseFilter(" missing ")).toEqual({ kind: "missing" });
    expect(parseFilter("—")).toEqual({ kind: "missing" });
    expect(parseFilter("Group 1")).toEqual({ kind: "text", needle: "group 1" });
    expect(parseFilter("> sixty")).toEqual({ kind: "text", needle: "> sixty" });
    expect(parseFilter("   ")).toEqual({ kind: "all" });
  });
});

describe("passes", () => {
  it("compares numbers and never lets a missing value through a comparison", () => {
    expect(passes(parseFilter("> 60"), 70, "70 %")).toBe(true);
    expect(passes(parseFilter("> 60"), 60, "60 %")).toBe(false);
    expect(passes(parseFilter(">= 60"), 60, "60 %")).toBe(true);
    expect(passes(parseFilter("= 30"), 30, "30 %")).toBe(true);
    expect(passes(parseFilter("< 50"), null, "—")).toBe(false);
    expect(passes(parseFilter("50 to 70"), 70, "70 %")).toBe(true);
    expect(passes(parseFilter("50 to 70"), 70.01, "70.01 %")).toBe(false);
  });

  it("finds text anywhere in the cell, case ignored, and missing only where there is no value", () => {
    expect(passes(parseFilter("unit"), null, "Units look off")).toBe(true);
    expect(passes(parseFilter("GROUP 2"), null, "Group 2")).toBe(true);
    expect(passes(parseFilter("missing"), null, "no upload")).toBe(true);
    expect(passes(parseFilter("missing"), 0, "0 %")).toBe(false);
    expect(passes(parseFilter(""), null, "")).toBe(true);
  });
});
