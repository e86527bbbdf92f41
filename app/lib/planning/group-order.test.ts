import { describe, expect, test } from "vitest";
import { newSeed, orderForGroups } from "./group-order";

const students = ["Student 10", "Student 2", "Student 1", "Student 3", "Student 20"].map((name, rosterIndex) => ({ name, rosterIndex }));

describe("order for forming groups", () => {
  test("by name is natural order (2 before 10); roster order is the order of joining", () => {
    expect(orderForGroups(students, "name").map((s) => s.name)).toEqual(["Student 1", "Student 2", "Student 3", "Student 10", "Student 20"]);
    expect(orderForGroups(students, "roster").map((s) => s.name)).toEqual(students.map((s) => s.name));
  });

  test("shuffled: the same seed gives the same order, and every student exactly once", () => {
    const a = orderForGroups(students, "shuffled", 4711).map((s) => s.name);
    expect(orderForGroups([...students].reverse(), "shuffled", 4711).map((s) => s.name)).toEqual(a);
    expect([...a].sort()).toEqual(students.map((s) => s.name).sort());
  });

  test("shuffled is a uniform permutation: each of 3! orders about 1/6 over 6,000 seeds (chi-square, 5 df, 1 % critical value 15.09; standard table)", () => {
    const three = students.slice(0, 3);
    const counts = new Map<string, number>();
    for (let seed = 1; seed <= 6000; seed++) {
      const key = orderForGroups(three, "shuffled", seed).map((s) => s.rosterIndex).join("");
      counts.set(key, (counts.get(key) ?? 0) + 1);
    }
    expect(counts.size).toBe(6);
    const chi2 = [...counts.values()].reduce((s, n) => s + (n - 1000) ** 2 / 1000, 0);
    expect(chi2).toBeLessThan(15.09);
  });

  test("seeds are whole numbers a person can type", () => {
    expect(newSeed(() => 0)).toBe(1);
    expect(newSeed(() => 0.9999999)).toBe(999_999);
  });
});
