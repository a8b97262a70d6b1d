// The night log as CSV: one executed or lost epoch per row, for any accepted astrometry programme.
// Each row is accepted or refused with its reasons (the target import's report, target-csv.ts);
// the same epoch twice (same observation within a minute) is refused too. The columns and shapes
// (the page uses them); the parser is night-log-csv.server.ts.
import type { CsvProblem } from "~/lib/proposals/target-csv";
import type { EpochRecordInput } from "./schema";

export const NIGHT_LOG_COLUMNS = ["proposal", "target", "observed_at", "telescope", "frames", "fwhm", "snr", "precision_mas", "lost", "note"] as const;
export const REQUIRED_NIGHT_LOG_COLUMNS = ["proposal", "observed_at", "telescope", "frames"] as const;
export const FIELD_OF: Record<string, string> = { observedAt: "observed_at", fwhmArcsec: "fwhm", precisionMas: "precision_mas", "lost.cause": "lost", lost: "lost", observationId: "target", telescopeId: "telescope" };
export const MAX_NIGHT_LOG_ROWS = 2_000;
/** The largest night log the office page takes, pasted or read from a file. */
export const NIGHT_LOG_MAX_BYTES = 2 * 1024 * 1024;

export const normaliseNightLogColumn = (c: string) => c.toLowerCase().replace(/[\s_-]/g, "");
export const KNOWN_NIGHT_LOG_COLUMNS = new Map<string, string>(NIGHT_LOG_COLUMNS.map((c) => [normaliseNightLogColumn(c), c]));

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
