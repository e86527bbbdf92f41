import { describe, expect, it } from "vitest";
import { validateFitRequest } from "./request.ts";

const valid = () => ({
  reaction: { a: 1, b: 2, orderA: 1, orderB: 1 },
  feed: { CA0: 0.02, CB0: 0.02 },
  units: { time: "min", concentration: "mol/L" },
  measurement: { kind: "concentrationA" },
  points: [
    [0, 0.02],
    [5, 0.0171],
    [10, 0.0153],
  ],
  temperatureC: 30,
  reference: { k: 0.11, TrefC: 25, EaKJ: 45, tolerancePct: 10 },
});

function errorsOf(json: unknown) {
  const r = validateFitRequest(json);
  if (r.ok) throw new Error("expected the request to be rejected");
  return r.errors;
}

describe("fit request validation", () => {
  it("accepts a complete request and returns it", () => {
    const r = validateFitRequest(valid());
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.request.points).toHaveLength(3);
  });

  it("accepts a first-order request without B (b = 0, orderB = 0, no CB0)", () => {
    const req = { ...valid(), reaction: { a: 1, b: 0, orderA: 1, orderB: 0 }, feed: { CA0: 0.02 } };
    delete (req as Record<string, unknown>).reference;
    expect(validateFitRequest(req).ok).toBe(true);
  });

  it("reports every bad point with its path: non-numbers, NaN, negative concentrations", () => {
    const req = valid();
    // -0.005 is below zero by more than reading noise (5 % of CA0 = 0.02); -0.0005 is noise around zero
    (req.points as unknown[]) = [[0, 0.02], ["5", 0.017], [10, NaN], [15, -0.005], [20], [25, null], [30, -0.0005]];
    const errors = errorsOf(req);
    expect(errors.map((e) => e.path)).toEqual(["points[1][0]", "points[2][1]", "points[3][1]", "points[4]", "points[5][1]"]);
    expect(errors[0].message).toMatch(/number/);
    expect(errors[1].message).toMatch(/NaN/);
    expect(errors[2].message).toMatch(/negative/);
  });

  it("rejects fewer than 3 points", () => {
    const req = valid();
    req.points = [[0, 0.02], [5, 0.017]];
    expect(errorsOf(req)).toEqual([{ path: "points", message: expect.stringMatching(/at least 3/) }]);
  });

  it("rejects an unknown measurement kind and a signal without S0", () => {
    expect(errorsOf({ ...valid(), measurement: { kind: "pressure" } })[0]).toEqual({
      path: "measurement.kind",
      message: expect.stringMatching(/unknown kind/),
    });
    expect(errorsOf({ ...valid(), measurement: { kind: "signal", Sinf: 1 } })).toEqual([
      { path: "measurement.S0", message: "is required" },
    ]);
  });

  it("rejects a feed of zero, for A and for a B that takes part", () => {
    const errors = errorsOf({ ...valid(), feed: { CA0: 0, CB0: 0 } });
    expect(errors.map((e) => e.path)).toEqual(["feed.CA0", "feed.CB0"]);
    expect(errors[0].message).toMatch(/zero/);
  });

  it("rejects unsupported orders with the supported ones named", () => {
    const errors = errorsOf({ ...valid(), reaction: { a: 1, b: 1, orderA: 3, orderB: 0 } });
    expect(errors).toEqual([{ path: "reaction", message: expect.stringMatching(/\(1, 0\).*\(2, 0\).*\(1, 1\)/) }]);
  });

  it("checks absorbance parameters, units, reference and unknown fields, all at once", () => {
    const errors = errorsOf({
      ...valid(),
      units: { time: "days", concentration: "M" },
      measurement: { kind: "absorbance", species: "C", epsilon: -5 },
      reference: { k: 0.11, EaKJ: 45 },
      temperatureC: undefined,
      colour: "blue",
    });
    const paths = errors.map((e) => e.path);
    expect(paths).toEqual(
      expect.arrayContaining([
        "colour",
        "measurement.species",
        "measurement.epsilon",
        "measurement.pathCm",
        "units.time",
        "units.concentration",
        "reference.TrefC",
        "temperatureC",
      ]),
    );
    expect(paths).toHaveLength(8);
  });

  it("rejects measuring B when B is not consumed", () => {
    const errors = errorsOf({ ...valid(), reaction: { a: 1, b: 0, orderA: 1, orderB: 0 }, measurement: { kind: "concentrationB" } });
    expect(errors).toEqual([{ path: "measurement", message: expect.stringMatching(/b = 0/) }]);
  });

  it("rejects a body that is not an object", () => {
    expect(errorsOf(null)).toEqual([{ path: "", message: "must be an object" }]);
    expect(errorsOf([1, 2])).toEqual([{ path: "", message: "must be an object" }]);
  });
});
