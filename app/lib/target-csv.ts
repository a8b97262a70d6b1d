// Target lists pasted or uploaded as CSV: parsed row by row, each row accepted or refused with
// its reasons (nothing dropped silently); duplicates by name or by position (within 1″) refused.
import { angularSeparationDeg } from "~/lib/astro/coordinates";
import { targetSchema, type TargetInput } from "~/lib/schemas/proposals";

/** Column names as written in the header (case, spaces and underscores do not matter). */
export const CSV_COLUMNS = ["name", "ra", "dec", "pmra", "pmdec", "mag_U", "mag_B", "mag_V", "mag_R", "mag_I", "magnitude", "band"] as const;
const normalise = (c: string) => c.toLowerCase().replace(/[\s_]/g, "");
const KNOWN = new Map<string, string>(CSV_COLUMNS.map((c) => [normalise(c), c]));
const REQUIRED = ["name", "ra", "dec"] as const;
export const DUPLICATE_RADIUS_ARCSEC = 1;
export const MAX_IMPORT_ROWS = 2_000;

export type CsvProblem = { field: string; message: string };
export type CsvRowResult =
  | { line: number; text: string; ok: true; target: TargetInput }
  | { line: number; text: string; ok: false; problems: CsvProblem[] };
export type CsvReport = { header: string; rows: CsvRowResult[]; error?: string };
export type ExistingTarget = { name: string; raDeg: number; decDeg: number };

/** Splits one CSV line (RFC 4180 quotes, comma or semicolon or tab separated). */
export function splitCsvLine(line: string, separator: string): string[] {
  const cells: string[] = [];
  let cell = "";
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (quoted) {
      if (c === '"' && line[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (c === '"') quoted = false;
      else cell += c;
    } else if (c === '"' && cell.trim() === "") {
      quoted = true;
      cell = "";
    } else if (c === separator) {
      cells.push(cell.trim());
      cell = "";
    } else cell += c;
  }
  cells.push(cell.trim());
  return cells;
}

function detectSeparator(header: string) {
  if (header.includes("\t")) return "\t";
  if (!header.includes(",") && header.includes(";")) return ";";
  return ",";
}

export function parseTargetCsv(text: string, existing: ExistingTarget[] = []): CsvReport {
  const lines = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/);
  const headerIndex = lines.findIndex((l) => l.trim() !== "" && !l.trim().startsWith("#"));
  if (headerIndex < 0) return { header: "", rows: [], error: "The CSV is empty: it needs a header row (name, ra, dec, and optionally pmra, pmdec, mag_V, mag_R … or magnitude, band) and one row per target." };
  const header = lines[headerIndex];
  const separator = detectSeparator(header);
  const columns = splitCsvLine(header, separator).map((c) => KNOWN.get(normalise(c)) ?? normalise(c));
  const unknown = columns.filter((c) => c !== "" && !(CSV_COLUMNS as readonly string[]).includes(c));
  const missing = REQUIRED.filter((c) => !columns.includes(c));
  if (missing.length || unknown.length) {
    const parts = [
      missing.length ? `missing column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}` : "",
      unknown.length ? `unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")}` : "",
    ].filter(Boolean);
    return {
      header,
      rows: [],
      error: `The header row (line ${headerIndex + 1}) has ${parts.join(" and ")}. Use: ${CSV_COLUMNS.join(", ")} (name, ra and dec are required; one mag_<band> column per band, or magnitude with band).`,
    };
  }
  const rows: CsvRowResult[] = [];
  const kept: (ExistingTarget & { line: number | null })[] = existing.map((t) => ({ ...t, line: null }));
  const dataLines = lines.slice(headerIndex + 1).map((text, i) => ({ text, line: headerIndex + 2 + i })).filter((l) => l.text.trim() !== "" && !l.text.trim().startsWith("#"));
  if (dataLines.length > MAX_IMPORT_ROWS) {
    return { header, rows: [], error: `The CSV has ${dataLines.length} rows; one import takes at most ${MAX_IMPORT_ROWS}. Split it.` };
  }
  for (const { text: lineText, line } of dataLines) {
    const cells = splitCsvLine(lineText, separator);
    const problems: CsvProblem[] = [];
    if (cells.length > columns.length) problems.push({ field: "(row)", message: `${cells.length} cells but the header has ${columns.length} columns` });
    const record: Record<string, string> = {};
    columns.forEach((c, i) => (record[c] = cells[i] ?? ""));
    const parsed = targetSchema.safeParse(record);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) problems.push({ field: String(issue.path[0] ?? "(row)"), message: issue.message });
    }
    if (parsed.success && problems.length === 0) {
      const t = parsed.data;
      const sameName = kept.find((k) => k.name.trim().toLowerCase() === t.name.toLowerCase());
      if (sameName) {
        problems.push({ field: "name", message: `duplicate: "${sameName.name}" ${sameName.line ? `is already on line ${sameName.line}` : "is already a target of this proposal"}` });
      } else {
        const near = kept.find((k) => angularSeparationDeg(k.raDeg, k.decDeg, t.raDeg, t.decDeg) * 3600 < DUPLICATE_RADIUS_ARCSEC);
        if (near) {
          problems.push({
            field: "ra",
            message: `duplicate: within ${DUPLICATE_RADIUS_ARCSEC}″ of "${near.name}" ${near.line ? `(line ${near.line})` : "(already a target of this proposal)"}`,
          });
        }
      }
      if (problems.length === 0) {
        kept.push({ name: t.name, raDeg: t.raDeg, decDeg: t.decDeg, line });
        rows.push({ line, text: lineText, ok: true, target: t });
        continue;
      }
    }
    rows.push({ line, text: lineText, ok: false, problems });
  }
  if (rows.length === 0) return { header, rows, error: "The CSV has a header but no target rows." };
  return { header, rows };
}

/** What goes back into the text box: the header and the refused rows, to be fixed and imported again. */
export function refusedCsvText(report: CsvReport) {
  const refused = report.rows.filter((r) => !r.ok);
  if (refused.length === 0) return "";
  return [report.header, ...refused.map((r) => r.text)].join("\n");
}
