import { describe, expect, it } from "vitest";
import { parseTargetCsv, refusedCsvText, splitCsvLine } from "./target-csv";

describe("target CSV import", () => {
  it("accepts sexagesimal and decimal positions with optional columns", () => {
    const report = parseTargetCsv(
      "name,ra,dec,pmra,pmdec,magnitude,band\nHollow Field A,05:12:33.4,+21:04:12,1.2,-3.4,15.2,V\nHollow Field B,78.25,-12.5,,,,\n",
    );
    expect(report.error).toBeUndefined();
    expect(report.rows.map((r) => r.ok)).toEqual([true, true]);
    const [a, b] = report.rows;
    if (!a.ok || !b.ok) throw new Error("expected accepted rows");
    expect(a.target.raDeg).toBeCloseTo(15 * (5 + 12 / 60 + 33.4 / 3600), 9);
    expect(a.target.decDeg).toBeCloseTo(21 + 4 / 60 + 12 / 3600, 9);
    expect(a.target.pmra).toBe(1.2);
    expect(b.target.magnitude).toBeNull();
  });

  it("refuses bad rows with line, field and reason, and keeps their text", () => {
    const csv = "name,ra,dec,magnitude,band\nGood,10.0,10.0,14,V\nBadRa,25:00:00,10,14,V\n,11.0,11.0,,\nNoBand,12,12,13,\nOddBand,13,13,13,Q";
    const report = parseTargetCsv(csv);
    const refused = report.rows.filter((r) => !r.ok);
    expect(refused.map((r) => r.line)).toEqual([3, 4, 5, 6]);
    const fields = refused.map((r) => (!r.ok ? r.problems.map((p) => p.field) : []));
    expect(fields[0]).toContain("ra");
    expect(fields[1]).toContain("name");
    expect(fields[2]).toContain("band");
    expect(fields[3]).toContain("band");
    expect(refusedCsvText(report).split("\n")).toEqual(["name,ra,dec,magnitude,band", "BadRa,25:00:00,10,14,V", ",11.0,11.0,,", "NoBand,12,12,13,", "OddBand,13,13,13,Q"]);
  });

  it("flags duplicates by name and by position within 1 arcsecond, in the file and against existing targets", () => {
    const csv = "name,ra,dec\nOne,100.0,20.0\none,101,21\nTwin,100.0001,20.0001\nFar,100.01,20.0\nOld twin,50.00005,-5";
    const report = parseTargetCsv(csv, [{ name: "Old", raDeg: 50, decDeg: -5 }]);
    const byLine = Object.fromEntries(report.rows.map((r) => [r.line, r]));
    expect(byLine[2].ok).toBe(true);
    expect(byLine[3].ok).toBe(false);
    expect(byLine[4].ok).toBe(false);
    expect(byLine[5].ok).toBe(true);
    expect(byLine[6].ok).toBe(false);
    const msg = (r: (typeof report.rows)[number]) => (!r.ok ? r.problems[0].message : "");
    expect(msg(byLine[3])).toMatch(/line 2/);
    expect(msg(byLine[4])).toMatch(/within 1″ of "One"/);
    expect(msg(byLine[6])).toMatch(/already a target/);
  });

  it("explains a bad header instead of guessing", () => {
    expect(parseTargetCsv("").error).toMatch(/empty/);
    expect(parseTargetCsv("target,alpha,delta\nx,1,2").error).toMatch(/missing columns name, ra, dec/);
    expect(parseTargetCsv("name,ra,dec\n").error).toMatch(/no target rows/);
  });

  it("handles quoted cells and semicolons", () => {
    expect(splitCsvLine('"Field, north",10,"say ""hi"""', ",")).toEqual(["Field, north", "10", 'say "hi"']);
    const report = parseTargetCsv("name;ra;dec\nSemi;10;10");
    expect(report.rows[0].ok).toBe(true);
  });
});
