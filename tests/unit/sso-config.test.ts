// The single sign-on settings: all three or none, and https unless the provider is on this machine.
import { describe, expect, test } from "vitest";
import { productionConfigProblems, ssoConfigFrom } from "~/.server/config.server";

const base = { NODE_ENV: "production", SESSION_SECRET: "x".repeat(40), APP_URL: "https://ratebook.example.org" };

describe("single sign-on configuration", () => {
  test("on only when issuer, client id and secret are all set", () => {
    expect(ssoConfigFrom({ OIDC_ISSUER: "https://login.example.edu" })).toBeNull();
    expect(ssoConfigFrom({ OIDC_ISSUER: "https://login.example.edu", OIDC_CLIENT_ID: "rb", OIDC_CLIENT_SECRET: "s", OIDC_ID_CLAIM: " student_number " })).toEqual({
      issuer: "https://login.example.edu",
      clientId: "rb",
      clientSecret: "s",
      idClaim: "student_number",
      label: null,
    });
  });

  test("a production server refuses half a configuration and a plain-http provider elsewhere", () => {
    expect(productionConfigProblems({ ...base, OIDC_ISSUER: "https://login.example.edu" })).toEqual([
      "Single sign-on needs OIDC_ISSUER, OIDC_CLIENT_ID and OIDC_CLIENT_SECRET together; only OIDC_ISSUER is set.",
    ]);
    const all = { ...base, OIDC_CLIENT_ID: "rb", OIDC_CLIENT_SECRET: "s" };
    expect(productionConfigProblems({ ...all, OIDC_ISSUER: "http://login.example.edu" })).toEqual(["OIDC_ISSUER (http://login.example.edu) must be an https:// address."]);
    expect(productionConfigProblems({ ...all, OIDC_ISSUER: "http://127.0.0.1:3090" })).toEqual([]);
    expect(productionConfigProblems({ ...all, OIDC_ISSUER: "https://login.example.edu" })).toEqual([]);
  });
});
