// The node:crypto reader must accept exactly what React Router's createCookie() writes, and
// refuse what it would refuse (the framework's own cookie code is the reference here).
import { createCookie } from "react-router";
import { describe, expect, it } from "vitest";
import { readSignedCookie } from "~/.server/signed-cookie.server";

const secrets = ["new-secret-for-the-test", "old-secret-for-the-test"];

describe("readSignedCookie", () => {
  it("reads a value createCookie signed, accents included, and agrees with createCookie.parse", async () => {
    const cookie = createCookie("probe", { secrets });
    const header = (await cookie.serialize({ userId: 42, note: "Zoë – 10 µL" })).split(";")[0];
    expect(readSignedCookie(`other=1; ${header}`, "probe", secrets)).toEqual({ userId: 42, note: "Zoë – 10 µL" });
    expect(readSignedCookie(header, "probe", secrets)).toEqual(await cookie.parse(header));
  });

  it("accepts a cookie signed with an older secret that is still listed", async () => {
    const old = createCookie("probe", { secrets: [secrets[1]] });
    const header = (await old.serialize("token-value")).split(";")[0];
    expect(readSignedCookie(header, "probe", secrets)).toBe("token-value");
  });

  it("refuses a changed value, a changed signature, an unknown secret and a missing cookie", async () => {
    const cookie = createCookie("probe", { secrets });
    const header = (await cookie.serialize({ userId: 1 })).split(";")[0];
    const [name, value] = header.split("=");
    const decoded = decodeURIComponent(value);
    const dot = decoded.lastIndexOf(".");
    const forgedValue = Buffer.from(JSON.stringify({ userId: 2 })).toString("base64") + decoded.slice(dot);
    expect(readSignedCookie(`${name}=${encodeURIComponent(forgedValue)}`, "probe", secrets)).toBeNull();
    const flipped = decoded.slice(0, -2) + (decoded.at(-2) === "A" ? "B" : "A") + decoded.at(-1);
    expect(readSignedCookie(`${name}=${encodeURIComponent(flipped)}`, "probe", secrets)).toBeNull();
    expect(readSignedCookie(header, "probe", ["some-other-secret"])).toBeNull();
    expect(await cookie.parse(`${name}=${encodeURIComponent(flipped)}`, {})).toBeNull();
    expect(readSignedCookie("unrelated=1", "probe", secrets)).toBeNull();
    expect(readSignedCookie(null, "probe", secrets)).toBeNull();
  });
});
