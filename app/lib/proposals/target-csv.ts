// Target lists pasted or uploaded as CSV: the columns, the report's shapes and the refused rows'
// text (the page uses them); the parser is target-csv.server.ts.
import type { TargetInput } from "~/lib/schemas/proposals";

/** Column names as written in the header (case, spaces and underscores do not matter). */
export const CSV_COLUMNS = ["name", "ra", "dec", "pmra", "pmdec", "mag_U", "mag_B", "mag_V", "mag_R", "mag_I", "magnitude", "band"] as const;
export const normaliseColumn = (c: string) => c.toLowerCase().replace(/[\s_]/g, "");
export const KNOWN_COLUMNS = new Map<string, string>(CSV_COLUMNS.map((c) => [normaliseColumn(c), c]));
export const REQUIRED_COLUMNS = ["name", "ra", "dec"] as const;
export const DUPLICATE_RADIUS_ARCSEC = 1;
export const MAX_IMPORT_ROWS = 2_000;
/** The largest CSV file the page takes in one import. */
export const CSV_UPLOAD_MAX_BYTES = 2_000_000;

export type CsvProblem = { field: string; message: string };
export type CsvRowResult =
  | { line: number; text: string; ok: true; target: TargetInput }
  | { line: number; text: string; ok: false; problems: CsvProblem[] };
export type CsvReport = { header: string; rows: CsvRowResult[]; error?: string };
export type ExistingTarget = { name: string; raDeg: number; decDeg: number };

/**
 * What goes back into the text box: the header and the refused rows, to be fixed and imported
 * again (any CSV import's report: the target list's, the night log's).
 */
export function refusedCsvText(report: { header: string; rows: { ok: boolean; text: string }[] }) {
  const refused = report.rows.filter((r) => !r.ok);
  if (refused.length === 0) return "";
  return [report.header, ...refused.map((r) => r.text)].join("\n");
}
