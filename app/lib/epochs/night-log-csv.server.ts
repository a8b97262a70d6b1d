// The night log's parser (the columns and shapes are in night-log-csv.ts).
import { readCsv } from "~/lib/csv.server";
import { epochRecordSchema, parseObservedAt } from "./schema";
import { FIELD_OF, KNOWN_NIGHT_LOG_COLUMNS, MAX_NIGHT_LOG_ROWS, NIGHT_LOG_COLUMNS, normaliseNightLogColumn, REQUIRED_NIGHT_LOG_COLUMNS, type NightLogContext, type NightLogReport, type NightLogRow } from "./night-log-csv";
import type { CsvProblem } from "~/lib/proposals/target-csv";

// The record's schema speaks the API's field names; the office wrote the night log's columns.
const API_FIELDS = new RegExp(`\\b(${Object.keys(FIELD_OF).filter((k) => FIELD_OF[k] !== k).sort((a, b) => b.length - a.length).map((k) => k.replace(".", "\\.")).join("|")})\\b`, "g");
const inColumns = (message: string) => message.replace(API_FIELDS, (m) => FIELD_OF[m]);

export function parseNightLogCsv(text: string, ctx: NightLogContext): NightLogReport {
  const read = readCsv(text);
  if ("empty" in read) return { header: "", rows: [], error: `The night log is empty: it needs a header row (${NIGHT_LOG_COLUMNS.join(", ")}) and one row per epoch.` };
  if ("error" in read) return { header: "", rows: [], error: read.error };
  const header = read.header.text;
  const columns = read.header.cells.map((c) => KNOWN_NIGHT_LOG_COLUMNS.get(normaliseNightLogColumn(c)) ?? c.trim());
  const unknown = columns.filter((c) => c !== "" && !(NIGHT_LOG_COLUMNS as readonly string[]).includes(c));
  const missing = REQUIRED_NIGHT_LOG_COLUMNS.filter((c) => !columns.includes(c));
  if (missing.length || unknown.length) {
    const parts = [missing.length ? `missing column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}` : "", unknown.length ? `unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")}` : ""].filter(Boolean);
    return { header, rows: [], error: `The header row (line ${read.header.line}) has ${parts.join(" and ")}. Use: ${NIGHT_LOG_COLUMNS.join(", ")} (${REQUIRED_NIGHT_LOG_COLUMNS.join(", ")} are required).` };
  }
  const dataLines = read.rows;
  if (dataLines.length > MAX_NIGHT_LOG_ROWS) return { header, rows: [], error: `The night log has ${dataLines.length} rows; one import takes at most ${MAX_NIGHT_LOG_ROWS}. Split it.` };
  if (dataLines.length === 0) return { header, rows: [], error: "The night log has a header but no epoch rows." };

  const seen = ctx.existing.map((e) => ({ ...e, line: null as number | null }));
  const rows: NightLogRow[] = [];
  for (const { text: lineText, line, cells } of dataLines) {
    const problems: CsvProblem[] = [];
    if (cells.length > columns.length) problems.push({ field: "(row)", message: `${cells.length} cells but the header has ${columns.length} columns` });
    const cell: Record<string, string> = {};
    columns.forEach((c, i) => (cell[c] = (cells[i] ?? "").trim()));

    const code = cell.proposal ?? "";
    const matches = ctx.programmes.filter((p) => p.code.toLowerCase() === code.toLowerCase());
    let programme: NightLogContext["programmes"][number] | null = null;
    if (!code) problems.push({ field: "proposal", message: "is required (the programme's code, e.g. 014/26B)" });
    else if (matches.length === 0) problems.push({ field: "proposal", message: `"${code}" is not an accepted astrometry programme` });
    else if (matches.length > 1) problems.push({ field: "proposal", message: `"${code}" matches ${matches.length} programmes; record these epochs on the programme's own page` });
    else programme = matches[0];

    let observationId: number | null = null;
    if (programme) {
      const name = cell.target ?? "";
      if (!name) {
        if (programme.observations.length === 1) observationId = programme.observations[0].observationId;
        else problems.push({ field: "target", message: `is required: ${programme.code} observes ${programme.observations.map((o) => o.targetName).join(", ")}` });
      } else {
        const hit = programme.observations.filter((o) => o.targetName.toLowerCase() === name.toLowerCase());
        if (hit.length === 1) observationId = hit[0].observationId;
        else problems.push({ field: "target", message: `"${name}" is not an astrometric target of ${programme.code}${programme.observations.length ? ` (${programme.observations.map((o) => o.targetName).join(", ")})` : ""}` });
      }
    }
    const telescopeText = cell.telescope ?? "";
    const telescope = ctx.telescopes.find((t) => t.name.toLowerCase() === telescopeText.toLowerCase() || String(t.id) === telescopeText);
    if (!telescope) problems.push({ field: "telescope", message: telescopeText ? `"${telescopeText}" is not a telescope of the observatory` : "is required" });

    const lost = (cell.lost ?? "").toLowerCase();
    const parsed = epochRecordSchema.safeParse({
      observedAt: cell.observed_at ?? "",
      telescopeId: telescope?.id ?? 1,
      frames: cell.frames ?? "",
      fwhmArcsec: cell.fwhm ?? "",
      snr: cell.snr ?? "",
      precisionMas: cell.precision_mas ?? "",
      ...(lost ? { lost: { cause: lost } } : {}),
      ...(cell.note ? { note: cell.note } : {}),
    });
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const path = issue.path.join(".");
        problems.push({ field: FIELD_OF[path] ?? (path || "(row)"), message: inColumns(issue.message) });
      }
    }
    if (parsed.success && observationId !== null && problems.length === 0) {
      const at = (parseObservedAt(parsed.data.observedAt) as Date).getTime();
      const twin = seen.find((s) => s.observationId === observationId && Math.abs(s.observedAt - at) < 60_000);
      if (twin) problems.push({ field: "observed_at", message: `duplicate: this epoch ${twin.line ? `is already on line ${twin.line}` : "is already in the epoch log"}` });
      else {
        seen.push({ observationId, observedAt: at, line });
        rows.push({ line, text: lineText, ok: true, proposalId: (programme as NonNullable<typeof programme>).proposalId, record: { ...parsed.data, telescopeId: (telescope as { id: number }).id, observationId } });
        continue;
      }
    }
    rows.push({ line, text: lineText, ok: false, problems });
  }
  return { header, rows };
}
