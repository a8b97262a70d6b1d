import { describe, expect, it } from "vitest";
import { bodyLimitFor, crossSiteReason, DEFAULT_BODY_LIMIT, isJsonContentType, parseTrustProxy } from "./front-rules";
import { SCIENCE_CASE_MAX_BYTES } from "../proposals/science-case";

describe("TRUST_PROXY", () => {
  it.each([
    [undefined, false],
    ["", false],
    ["0", false],
    ["1", 1],
    ["2", 2],
    ["127.0.0.1", ["127.0.0.1"]],
    ["10.0.0.0/8, ::1 ,loopback", ["10.0.0.0/8", "::1", "loopback"]],
  ])("%j → %j", (value, expected) => {
    expect(parseTrustProxy(value)).toEqual({ ok: true, value: expected });
  });

  it.each(["true", "yes", "proxy.example", "10.0.0.0/33", "1.2.3", "-1", "1.5"])("refuses %j", (value) => {
    expect(parseTrustProxy(value).ok).toBe(false);
  });
});

describe("body limits", () => {
  it("gives the science-case upload its own limit plus an envelope, 1 MB elsewhere", () => {
    expect(bodyLimitFor("/proposals/12/science-case").limit).toBeGreaterThan(SCIENCE_CASE_MAX_BYTES);
    expect(bodyLimitFor("/proposals/12/science-case.data").limit).toBeGreaterThan(SCIENCE_CASE_MAX_BYTES);
    expect(bodyLimitFor("/sign-in").limit).toBe(1024 * 1024);
    expect(bodyLimitFor("/api/v1/exposure").limit).toBe(DEFAULT_BODY_LIMIT);
  });
});

describe("same-origin checks", () => {
  const ours = new Set(["http://127.0.0.1:3000"]);
  it.each([
    [{}, null],
    [{ origin: "http://127.0.0.1:3000" }, null],
    [{ secFetchSite: "same-origin", origin: "http://127.0.0.1:3000" }, null],
    [{ secFetchSite: "none" }, null],
  ])("accepts %j", (headers, expected) => expect(crossSiteReason(headers, ours)).toBe(expected));

  it.each([{ origin: "http://127.0.0.1:3001" }, { origin: "null" }, { secFetchSite: "same-site" }, { secFetchSite: "cross-site" }, { secFetchSite: "same-origin", origin: "https://elsewhere.example" }])(
    "refuses %j",
    (headers) => expect(crossSiteReason(headers, ours)).toMatch(/./),
  );

  it("recognises JSON content types", () => {
    expect(isJsonContentType("application/json; charset=utf-8")).toBe(true);
    expect(isJsonContentType("application/merge-patch+json")).toBe(true);
    expect(isJsonContentType("text/plain")).toBe(false);
    expect(isJsonContentType("application/x-www-form-urlencoded")).toBe(false);
    expect(isJsonContentType(undefined)).toBe(false);
  });
});
