// Target lists pasted or uploaded as CSV: parsed row by row, each row accepted or refused with
// its reasons (nothing dropped silently); duplicates by name or by position (within 1″) refused.
import { angularSeparationDeg } from "~/lib/astro/coordinates";
import { readCsv } from "~/lib/csv.server";
import { targetSchema } from "~/lib/schemas/proposals";
import { CSV_COLUMNS, DUPLICATE_RADIUS_ARCSEC, KNOWN_COLUMNS, MAX_IMPORT_ROWS, normaliseColumn, REQUIRED_COLUMNS, type CsvProblem, type CsvReport, type CsvRowResult, type ExistingTarget } from "~/lib/proposals/target-csv";

export function parseTargetCsv(text: string, existing: ExistingTarget[] = []): CsvReport {
  const read = readCsv(text);
  if ("empty" in read) return { header: "", rows: [], error: "The CSV is empty: it needs a header row (name, ra, dec, and optionally pmra, pmdec, mag_V, mag_R … or magnitude, band) and one row per target." };
  if ("error" in read) return { header: "", rows: [], error: read.error };
  const header = read.header.text;
  const headerLine = read.header.line;
  const columns = read.header.cells.map((c) => KNOWN_COLUMNS.get(normaliseColumn(c)) ?? normaliseColumn(c));
  const unknown = columns.filter((c) => c !== "" && !(CSV_COLUMNS as readonly string[]).includes(c));
  const missing = REQUIRED_COLUMNS.filter((c) => !columns.includes(c));
  if (missing.length || unknown.length) {
    const parts = [
      missing.length ? `missing column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}` : "",
      unknown.length ? `unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")}` : "",
    ].filter(Boolean);
    return {
      header,
      rows: [],
      error: `The header row (line ${headerLine}) has ${parts.join(" and ")}. Use: ${CSV_COLUMNS.join(", ")} (name, ra and dec are required; one mag_<band> column per band, or magnitude with band).`,
    };
  }
  const rows: CsvRowResult[] = [];
  const kept: (ExistingTarget & { line: number | null })[] = existing.map((t) => ({ ...t, line: null }));
  const dataLines = read.rows;
  if (dataLines.length > MAX_IMPORT_ROWS) {
    return { header, rows: [], error: `The CSV has ${dataLines.length} rows; one import takes at most ${MAX_IMPORT_ROWS}. Split it.` };
  }
  for (const { text: lineText, line, cells } of dataLines) {
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

