import { describe, expect, it } from "vitest";
import { refusedCsvText } from "./target-csv";
import { parseTargetCsv } from "./target-csv.server";

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

  it("reads one magnitude per band from mag_<band> columns (any case), alongside the older magnitude,band pair", () => {
    const report = parseTargetCsv("name,ra,dec,Mag_V,mag_r,MAG_I\nThree-band,10,10,16.2,15.8,15.1\nV only,11,11,17,,\nNone,12,12,,,");
    expect(report.error).toBeUndefined();
    const got = report.rows.map((r) => (r.ok ? r.target.magnitudes : null));
    expect(got).toEqual([{ V: 16.2, R: 15.8, I: 15.1 }, { V: 17 }, {}]);
    const pair = parseTargetCsv("name,ra,dec,mag_V,magnitude,band\nBoth,10,10,16.2,15.9,R\nClash,11,11,16.2,16.0,V");
    expect(pair.rows[0].ok && pair.rows[0].target.magnitudes).toEqual({ V: 16.2, R: 15.9 });
    expect(!pair.rows[1].ok && pair.rows[1].problems.map((p) => p.message)).toEqual(["The V magnitude is given twice (16 and 16.2): keep one."]);
    const bad = parseTargetCsv("name,ra,dec,mag_V\nBright,10,10,very");
    expect(!bad.rows[0].ok && bad.rows[0].problems[0].field).toBe("mag_V");
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
    const report = parseTargetCsv("name;ra;dec\nSemi;10;10");
    expect(report.rows[0].ok).toBe(true);
  });

  it("keeps a quoted line break inside its cell and counts the lines after it", () => {
    // before csv-parse, the text was split into lines first and this row broke in two
    const report = parseTargetCsv('name,ra,dec\n"Field\nnorth",10,10\n"Next,\nwith a comma",11,11\nLast,12,12');
    expect(report.error).toBeUndefined();
    expect(report.rows.map((r) => [r.line, r.ok])).toEqual([[2, true], [4, true], [6, true]]);
    expect(report.rows[0].ok && report.rows[0].target.name).toBe("Field\nnorth");
  });
});
