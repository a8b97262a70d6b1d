// isoTime against the reference it replaces: Date.prototype.toISOString (ECMAScript's Date Time
// String Format, the JavaScript engine's own implementation).
import { describe, expect, it } from "vitest";
import { isoTime } from "./time";

describe("isoTime", () => {
  it("writes every instant as toISOString does", () => {
    let seed = 7;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const values = [
      0, -1, 1, 999, 1000, 59_999, 60_000, 3_599_999, 86_399_999, 86_400_000, -86_400_000, -86_400_001,
      Date.UTC(2027, 1, 28, 23, 59, 59, 999), Date.UTC(2028, 1, 29, 12), Date.UTC(1969, 11, 31, 23, 59, 59, 999),
      Date.UTC(0, 0, 1) - Date.UTC(1900, 0, 1) + Date.UTC(1900, 0, 1), -62_167_219_200_000, 253_402_300_799_999, 1.5, 1.999, -0.5, -1.5,
    ];
    for (let i = 0; i < 20_000; i++) values.push(Date.UTC(1900, 0, 1) + rnd() * (Date.UTC(2100, 0, 1) - Date.UTC(1900, 0, 1)));
    for (const t of values) expect(isoTime(t), String(t)).toBe(new Date(t).toISOString());
  });

  it("hands years outside 0–9999 to toISOString (six-digit years)", () => {
    for (const t of [-62_167_219_200_001, 253_402_300_800_000, 8.64e15]) expect(isoTime(t)).toBe(new Date(t).toISOString());
  });
});
