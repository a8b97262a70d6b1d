import { describe, expect, it } from "vitest";
import { decimalAmount, formatMoney, minorDigits } from "./money";

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
});
