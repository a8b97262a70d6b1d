import { describe, expect, it } from "vitest";
import { fixed, grouped, hours, NONE, percent } from "./format";

describe("number formatting", () => {
  it("writes known numbers with fixed decimals", () => {
    expect(fixed(12.345, 2)).toBe("12.35");
    expect(fixed(3)).toBe("3.0");
    expect(hours(2.25, 1)).toBe("2.3 h");
    expect(percent(0.125)).toBe("13 %");
    expect(percent(0.125, 1)).toBe("12.5 %");
  });

  it("groups thousands and never shows -0", () => {
    expect(grouped(12345.6)).toBe("12,345.60");
    expect(grouped(-0.0004, 3)).toBe("0.000");
    expect(grouped(-1.5, 1)).toBe("-1.5");
  });

  it("one mark, an em dash, for an unknown number", () => {
    expect(NONE).toBe("\u2014");
    for (const x of [null, undefined, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect([fixed(x), hours(x), percent(x), grouped(x)]).toEqual([NONE, NONE, NONE, NONE]);
    }
  });
});
