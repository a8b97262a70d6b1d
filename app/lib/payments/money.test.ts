import { describe, expect, it } from "vitest";
import { decimalAmount, formatMoney, minorDigits, spreadsheetSafe } from "./money";

describe("money", () => {
  it("knows the minor unit of the currency (ISO 4217: EUR 2 digits, JPY 0, KWD 3; from memory)", () => {
    expect(minorDigits("eur")).toBe(2);
    expect(minorDigits("JPY")).toBe(0);
    expect(minorDigits("KWD")).toBe(3);
  });

  it("writes amounts from minor units", () => {
    expect(formatMoney(59_375, "eur")).toBe("EUR 593.75");
    expect(formatMoney(1_234_500, "eur")).toBe("EUR 12,345.00");
    expect(formatMoney(4_500, "jpy")).toBe("JPY 4,500");
    expect(decimalAmount(45_000, "eur")).toBe("450.00");
  });

  it("neutralises spreadsheet formulas with a leading ' (common practice)", () => {
    for (const risky of ["=1+2", "+31 cluster", "-2 stars", "@SUM(A1)", "\t=1", "\r=1"]) expect(spreadsheetSafe(risky)).toBe(`'${risky}`);
    for (const plain of ["Visiting PI", "0.5 h", "a=b", "", null]) expect(spreadsheetSafe(plain)).toBe(plain ?? "");
  });
});
