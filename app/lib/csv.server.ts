// CSV text as the imports read it (targets, the night log), through csv-parse: RFC 4180 quotes
// (a quoted field may hold the separator, doubled quotes and line breaks), a byte-order mark,
// blank lines and lines starting with # skipped, cells trimmed, a separator of comma, semicolon or
// tab taken from the header line. Each record keeps the line it starts on and its own text, so a
// refused row can be named by its line and handed back as typed.
import { CsvError, parse } from "csv-parse/sync";

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
