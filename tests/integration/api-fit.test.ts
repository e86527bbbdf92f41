// The JSON fit API: the same engine as `npm run fit`, behind the role guard.
import { describe, expect, test } from "vitest";
import { action as fitAction } from "~/routes/api/fit";
import { call, demoCookie } from "./helpers";

function post(body: string, cookie?: string) {
  const headers: Record<string, string> = { "Content-Type": "application/json" };
  if (cookie) headers.Cookie = cookie;
  return new Request("http://127.0.0.1:3100/api/fit", { method: "POST", headers, body });
}

// Points from the integrated law for A + 2B with a stoichiometric feed, 1/CA - 1/CA0 = b k t
// (Levenspiel, Chemical Reaction Engineering, 3rd ed., ch. 3; from memory).
const k = 0.1; // L/(mol s)
const CA0 = 0.02;
const points = [0, 60, 120, 240, 480, 900, 1500].map((t) => [t, 1 / (1 / CA0 + 2 * k * t)]);
const good = {
  reaction: { a: 1, b: 2, orderA: 1, orderB: 1 },
  feed: { CA0, CB0: 2 * CA0 },
  units: { time: "s", concentration: "mol/L" },
  measurement: { kind: "concentrationA" },
  points,
};

describe("POST /api/fit", () => {
  test("signed out: 401; a student: 403", async () => {
    expect((await call(fitAction, post(JSON.stringify(good)))).status).toBe(401);
    expect((await call(fitAction, post(JSON.stringify(good), await demoCookie("student")))).status).toBe(403);
  });

  test("an instructor gets the fit: stoichiometric model, k recovered from exact data", async () => {
    const res = await call(fitAction, post(JSON.stringify(good), await demoCookie("instructor")));
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.model).toBe("second-order-AB-stoichiometric");
    expect(body.kUnit).toBe("L/(mol*s)");
    expect(body.k).toBeCloseTo(k, 8);
    expect(body.n).toBe(points.length);
  });

  test("a pooled Arrhenius request gets Ea and A with intervals; a bad one gets its paths", async () => {
    const cookie = await demoCookie("instructor");
    // exact k from k(25 C) = 0.112 L/(mol s), Ea = 48.37 kJ/mol (shared/reference/kinetics-literature.md)
    const benches = [15, 25, 35].map((c) => ({ temperatureC: c, k: 0.112 * Math.exp((-48370 / 8.314462618) * (1 / (c + 273.15) - 1 / 298.15)) }));
    const res = await call(fitAction, post(JSON.stringify({ arrhenius: { benches } }), cookie));
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.EaKJ).toBeCloseTo(48.37, 8);
    expect(body.weighting).toBe("equal");
    const bad = await call(fitAction, post(JSON.stringify({ arrhenius: { benches: benches.slice(0, 2) } }), cookie));
    expect(bad.status).toBe(400);
    expect((await bad.json()).errors[0].path).toBe("arrhenius.benches");
  });

  test("bad JSON and invalid requests get 400 with every problem and its place", async () => {
    const cookie = await demoCookie("instructor");
    const notJson = await call(fitAction, post("{ nope", cookie));
    expect(notJson.status).toBe(400);
    expect((await notJson.json()).errors[0].message).toMatch(/not valid JSON/);
    const bad = { ...good, feed: { CA0: 0, CB0: 0.04 }, points: [[0, 0.02], [5, "x"], [10, -1]] };
    const res = await call(fitAction, post(JSON.stringify(bad), cookie));
    expect(res.status).toBe(400);
    const paths = (await res.json()).errors.map((e: { path: string }) => e.path);
    expect(paths).toEqual(expect.arrayContaining(["feed.CA0", "points[1][1]", "points[2][1]"]));
    const unknownKind = await call(fitAction, post(JSON.stringify({ ...good, measurement: { kind: "smell" } }), cookie));
    expect((await unknownKind.json()).errors.map((e: { path: string }) => e.path)).toContain("measurement.kind");
  });
});
