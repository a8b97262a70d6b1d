import { describe, expect, it } from "vitest";
import { angularSeparationDeg, formatDec, formatRa, parseDec, parseRa, positionAt, J2000_MS } from "./coordinates";

const ok = (r: ReturnType<typeof parseRa>) => {
  if (!r.ok) throw new Error(r.message);
  return r.value;
};

describe("parseRa", () => {
  it("reads the sexagesimal spellings and decimal degrees", () => {
    const expected = 15 * (16 + 23 / 60 + 35 / 3600);
    expect(ok(parseRa("16:23:35"))).toBeCloseTo(expected, 10);
    expect(ok(parseRa("16 23 35"))).toBeCloseTo(expected, 10);
    expect(ok(parseRa("16h23m35s"))).toBeCloseTo(expected, 10);
    expect(ok(parseRa("16h 23m 35.0s"))).toBeCloseTo(expected, 10);
    expect(ok(parseRa("245.896"))).toBe(245.896);
    expect(ok(parseRa(0))).toBe(0);
    expect(ok(parseRa("00:00:00.5"))).toBeCloseTo(0.5 / 240, 12);
  });

  it("rejects out-of-range values with a message naming the field and the range", () => {
    const bad = ["24:00:00", "12:60:00", "12:30:60", "360", "-1", "-01:00:00", "abc", "", "12:3x:00", "1:2:3:4"];
    for (const text of bad) {
      expect(parseRa(text, "ra"), text).toMatchObject({ ok: false, message: expect.stringMatching(/^ra:/) });
    }
    expect(parseRa("400", "target.ra")).toMatchObject({ ok: false, message: expect.stringContaining("0 ≤ RA < 360") });
  });
});

describe("parseDec", () => {
  it("reads signs, separators and decimal degrees", () => {
    expect(ok(parseDec("-12:34:56.7"))).toBeCloseTo(-(12 + 34 / 60 + 56.7 / 3600), 10);
    expect(ok(parseDec("+12 34 56.7"))).toBeCloseTo(12 + 34 / 60 + 56.7 / 3600, 10);
    expect(ok(parseDec("-0 30 00"))).toBeCloseTo(-0.5, 12); // the sign of a zero-degree Dec survives
    expect(ok(parseDec("-12d34m56s"))).toBeCloseTo(-(12 + 34 / 60 + 56 / 3600), 10);
    expect(ok(parseDec("−05:00:00"))).toBe(-5); // Unicode minus
    expect(ok(parseDec("-45.5"))).toBe(-45.5);
    expect(ok(parseDec("90"))).toBe(90);
  });

  it("rejects out-of-range values", () => {
    for (const text of ["+91:00:00", "-90:00:01", "12:60:00", "12:00:60", "91", "x", ""]) {
      expect(parseDec(text, "dec"), text).toMatchObject({ ok: false, message: expect.stringMatching(/^dec:/) });
    }
    const r = parseDec("95", "dec");
    expect(r).toMatchObject({ ok: false, message: expect.stringContaining("−90 ≤ Dec ≤ +90") });
  });
});

describe("formatting", () => {
  it("round-trips through sexagesimal without carrying errors at 60", () => {
    expect(formatRa(15 * (16 + 23 / 60 + 35 / 3600))).toBe("16:23:35.00");
    expect(formatRa(359.99999999)).toBe("00:00:00.00");
    expect(formatDec(-(12 + 34 / 60 + 56.7 / 3600))).toBe("-12:34:56.7");
    expect(formatDec(-0.5)).toBe("-00:30:00.0");
    expect(formatDec(29.999999999)).toBe("+30:00:00.0");
    for (const deg of [0.1234, 123.456, 271.9999]) expect(ok(parseRa(formatRa(deg, 4)))).toBeCloseTo(deg, 5);
  });
});

describe("angular separation", () => {
  it("Meeus, Astronomical Algorithms 2nd ed., example 17.a: Arcturus–Spica = 32.7930° (book value)", () => {
    // α1 = 213.9154°, δ1 = +19.1825°; α2 = 201.2983°, δ2 = −11.1614° (values printed in the example)
    expect(angularSeparationDeg(213.9154, 19.1825, 201.2983, -11.1614)).toBeCloseTo(32.793, 3);
  });

  it("stays accurate for tiny separations", () => {
    expect(angularSeparationDeg(10, 20, 10 + 1e-6 / Math.cos((20 * Math.PI) / 180), 20) * 3.6e6).toBeCloseTo(3.6, 3);
  });
});

describe("proper motion", () => {
  it("moves a star by μ·Δt on the sky", () => {
    // 1000 mas/yr east and 500 mas/yr north for 10 Julian years: 10″ and 5″
    const t = J2000_MS + 10 * 365.25 * 86400e3;
    const p = positionAt({ raDeg: 150, decDeg: 60, pmRaCosDecMasPerYr: 1000, pmDecMasPerYr: 500 }, t);
    expect((p.raDeg - 150) * Math.cos((60 * Math.PI) / 180) * 3600).toBeCloseTo(10, 2);
    expect((p.decDeg - 60) * 3600).toBeCloseTo(5, 2);
    expect(angularSeparationDeg(150, 60, p.raDeg, p.decDeg) * 3600).toBeCloseTo(Math.hypot(10, 5), 3);
  });
});
