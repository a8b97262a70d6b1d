// CSV both ways.
// Reading, as the imports do (targets, the night log), through csv-parse: RFC 4180 quotes
// (a quoted field may hold the separator, doubled quotes and line breaks), a byte-order mark,
// blank lines and lines starting with # skipped, cells trimmed, a separator of comma, semicolon or
// tab taken from the header line. Each record keeps the line it starts on and its own text, so a
// refused row can be named by its line and handed back as typed.
// Writing, as every export does (`csvText`: the ranked list, the allocation, the charges), through
// csv-stringify, with each text cell made safe for spreadsheets (`spreadsheetSafe`).
import { CsvError, parse } from "csv-parse/sync";
import { stringify } from "csv-stringify/sync";

export type CsvLine = { line: number; text: string; cells: string[] };
export type CsvRead = { header: CsvLine; rows: CsvLine[] } | { error: string } | { empty: true };

const skipped = (line: string) => line.trim() === "" || line.trim().startsWith("#");

export function detectSeparator(header: string) {
  if (header.includes("\t")) return "\t";
  if (!header.includes(",") && header.includes(";")) return ";";
  return ",";
}

export function readCsv(text: string): CsvRead {
  const body = text.replace(/^\uFEFF/, "");
  const header = body.split(/\r\n|\n|\r/).find((l) => !skipped(l));
  if (header === undefined) return { empty: true };
  type WithInfo = { record: string[]; info: { lines: number; raw?: string } };
  let records: WithInfo[];
  try {
    records = parse(body, {
      delimiter: detectSeparator(header),
      relax_column_count: true,
      relax_quotes: true,
      skip_empty_lines: true,
      comment: "#",
      comment_no_infix: true,
      trim: true,
      info: true,
      raw: true,
      // csv-parse's typings return string[][] whatever the options; with info it returns records with their info
    }) as unknown as WithInfo[];
  } catch (error) {
    if (error instanceof CsvError) {
      const line = (error as CsvError & { lines?: number }).lines;
      return { error: error.code === "CSV_QUOTE_NOT_CLOSED" ? `A quoted field${line ? ` (from line ${line} on)` : ""} is never closed: add the closing " or remove the opening one.` : `The CSV could not be read: ${error.message}` };
    }
    throw error;
  }
  const lines = records.map(({ record, info }) => {
    // the raw text starts with the blank and comment lines skipped before the record: drop them
    const rawLines = (info.raw ?? "").replace(/(\r\n|\n|\r)$/, "").split(/\r\n|\n|\r/);
    while (rawLines.length > 1 && skipped(rawLines[0])) rawLines.shift();
    return { line: info.lines - (rawLines.length - 1), text: rawLines.join("\n"), cells: record };
  });
  const [first, ...rows] = lines;
  return { header: first, rows };
}

// A text cell that a spreadsheet would read as a formula (a title "=HYPERLINK(…)", a reason
// "+1+cmd|…") gets a leading ', which spreadsheets take as "text" and do not show. The leading
// characters: = + - @, tab and carriage return (OWASP's "CSV Injection" page, from memory), NUL
// (OWASP ASVS 5.0, requirement 1.2.10), and the full-width ＝ ＋ － ＠ that some spreadsheets
// normalise to them (csv-stringify's `escape_formulas` list). csv-stringify's own option would
// also mark our formatted negative numbers ("-0.512" is a string here): a cell that is a plain
// decimal number stays as it is.
const FORMULA_START = /^[=+\-@\t\r\0\uFF1D\uFF0B\uFF0D\uFF20]/;
const PLAIN_NUMBER = /^-?\d+(\.\d+)?$/;

export function spreadsheetSafe<T>(cell: T): T | string {
  return typeof cell === "string" && FORMULA_START.test(cell) && !PLAIN_NUMBER.test(cell) ? `'${cell}` : cell;
}

/** The lines as CSV (RFC 4180), every text cell through `spreadsheetSafe`. */
export function csvText(lines: readonly (readonly unknown[])[]): string {
  return stringify(lines.map((line) => line.map(spreadsheetSafe)));
}
