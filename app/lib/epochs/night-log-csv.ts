// The night log as CSV: one executed or lost epoch per row, for any accepted astrometry programme.
// Each row is accepted or refused with its reasons (the target import's report, target-csv.ts);
// the same epoch twice (same observation within a minute) is refused too.
import { splitCsvLine, type CsvProblem } from "~/lib/target-csv";
import { epochRecordSchema, parseObservedAt, type EpochRecordInput } from "./schema";

export const NIGHT_LOG_COLUMNS = ["proposal", "target", "observed_at", "telescope", "frames", "fwhm", "snr", "precision_mas", "lost", "note"] as const;
const REQUIRED = ["proposal", "observed_at", "telescope", "frames"] as const;
const FIELD_OF: Record<string, string> = { observedAt: "observed_at", fwhmArcsec: "fwhm", precisionMas: "precision_mas", "lost.cause": "lost", lost: "lost", observationId: "target", telescopeId: "telescope" };
export const MAX_NIGHT_LOG_ROWS = 2_000;

const normalise = (c: string) => c.toLowerCase().replace(/[\s_-]/g, "");
const KNOWN = new Map<string, string>(NIGHT_LOG_COLUMNS.map((c) => [normalise(c), c]));

export type NightLogContext = {
  programmes: { proposalId: number; code: string; observations: { observationId: number; targetName: string }[] }[];
  telescopes: { id: number; name: string }[];
  /** epochs already in the log (observation, time), to refuse the same one twice */
  existing: { observationId: number; observedAt: number }[];
};

export type NightLogRow =
  | { line: number; text: string; ok: true; proposalId: number; record: EpochRecordInput & { observationId: number } }
  | { line: number; text: string; ok: false; problems: CsvProblem[] };
export type NightLogReport = { header: string; rows: NightLogRow[]; error?: string };

export function parseNightLogCsv(text: string, ctx: NightLogContext): NightLogReport {
  const lines = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/);
  const headerIndex = lines.findIndex((l) => l.trim() !== "" && !l.trim().startsWith("#"));
  if (headerIndex < 0) return { header: "", rows: [], error: `The night log is empty: it needs a header row (${NIGHT_LOG_COLUMNS.join(", ")}) and one row per epoch.` };
  const header = lines[headerIndex];
  const separator = header.includes("\t") ? "\t" : !header.includes(",") && header.includes(";") ? ";" : ",";
  const columns = splitCsvLine(header, separator).map((c) => KNOWN.get(normalise(c)) ?? c.trim());
  const unknown = columns.filter((c) => c !== "" && !(NIGHT_LOG_COLUMNS as readonly string[]).includes(c));
  const missing = REQUIRED.filter((c) => !columns.includes(c));
  if (missing.length || unknown.length) {
    const parts = [missing.length ? `missing column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}` : "", unknown.length ? `unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")}` : ""].filter(Boolean);
    return { header, rows: [], error: `The header row (line ${headerIndex + 1}) has ${parts.join(" and ")}. Use: ${NIGHT_LOG_COLUMNS.join(", ")} (${REQUIRED.join(", ")} are required).` };
  }
  const dataLines = lines
    .slice(headerIndex + 1)
    .map((t, i) => ({ text: t, line: headerIndex + 2 + i }))
    .filter((l) => l.text.trim() !== "" && !l.text.trim().startsWith("#"));
  if (dataLines.length > MAX_NIGHT_LOG_ROWS) return { header, rows: [], error: `The night log has ${dataLines.length} rows; one import takes at most ${MAX_NIGHT_LOG_ROWS}. Split it.` };
  if (dataLines.length === 0) return { header, rows: [], error: "The night log has a header but no epoch rows." };

  const seen = ctx.existing.map((e) => ({ ...e, line: null as number | null }));
  const rows: NightLogRow[] = [];
  for (const { text: lineText, line } of dataLines) {
    const cells = splitCsvLine(lineText, separator);
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
        problems.push({ field: FIELD_OF[path] ?? path ?? "(row)", message: issue.message.replace(/^(observedAt|fwhmArcsec|precisionMas|snr|frames|lost\.cause|note)\b/, (m) => FIELD_OF[m] ?? m) });
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

export function refusedNightLogText(report: NightLogReport) {
  const refused = report.rows.filter((r) => !r.ok);
  return refused.length ? [report.header, ...refused.map((r) => r.text)].join("\n") : "";
}
