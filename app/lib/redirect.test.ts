import { describe, expect, it } from "vitest";
import { sameOriginPath } from "./redirect";

const APP = "https://nightshare.test:8443";

describe("sameOriginPath (where sign-in returns to)", () => {
  it.each([
    ["/admin/users", "/admin/users"],
    ["/proposals/12?tab=team#targets", "/proposals/12?tab=team#targets"],
    ["/proposals/../admin", "/admin"],
    ["/%09/evil.example", "/%09/evil.example"],
  ])("keeps the same-origin path %s", (value, expected) => {
    expect(sameOriginPath(value, APP)).toBe(expected);
  });

  // Known bypass forms of "starts with / but not //" checks.
  it.each([
    "//evil.example",
    "/\\evil.example",
    "/\\\\evil.example",
    "\\\\evil.example",
    "/\t/evil.example",
    "/\n/evil.example",
    "/\r\n/evil.example",
    "/ /evil.example".replace(" ", "\t"),
    "https://evil.example",
    "http:evil.example",
    "https:/evil.example",
    "javascript:alert(1)",
    "evil.example",
    "/.//evil.example",
    "/./\\evil.example",
    "//nightshare.test:8443@evil.example",
    "/\\/evil.example",
    "",
    "?x=1",
  ])("refuses %j", (value) => {
    expect(sameOriginPath(value, APP)).toBe("/");
  });

  it("refuses non-strings and falls back to the given path", () => {
    expect(sameOriginPath(undefined, APP, "/proposals")).toBe("/proposals");
    expect(sameOriginPath(["/a"], APP)).toBe("/");
  });

  it("never answers a path a browser would read as another host", () => {
    // Decoded forms of the percent-encoded bypasses, and the encoded forms themselves.
    for (const raw of ["%2F%2Fevil.example", "%2F%5Cevil.example", "/%2F/evil.example", "/%5C/evil.example", "/%09/evil.example"]) {
      for (const value of [raw, decodeURIComponent(raw)]) {
        const path = sameOriginPath(value, APP);
        expect(new URL(path, APP).origin, value).toBe(new URL(APP).origin);
      }
    }
  });
});
