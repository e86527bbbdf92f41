import { describe, expect, it } from "vitest";
import { doubledWords } from "./words";

describe("doubledWords", () => {
  it("finds a word said twice in a row, whatever its case", () => {
    expect(doubledWords("Group Group 1")).toEqual(["group"]);
    expect(doubledWords("Bench 3 · group group 2")).toEqual(["group"]);
  });
  it("finds a repeated unit", () => {
    expect(doubledWords("t (s) (s)")).toEqual(["(s)"]);
  });
  it("passes plain labels and repeated numbers", () => {
    expect(doubledWords("Group 1")).toEqual([]);
    expect(doubledWords("Marking k (L/(mol·s)), 95 % CI")).toEqual([]);
    expect(doubledWords("rows 1 1 and 2")).toEqual([]);
    expect(doubledWords("")).toEqual([]);
  });
});
