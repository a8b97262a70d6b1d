import { describe, expect, it } from "vitest";
import { readCsv } from "./csv.server";

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
