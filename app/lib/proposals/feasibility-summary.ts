// What the feasibility sheet page sends with its HTML: the sheet's totals, problems and one line
// per observation. A card's details (the exposure, the epochs, the hours per night and the
// nights its chart needs) come from GET /api/v1/proposals/:id/feasibility?observationId= when
// the card opens. At 500 observations the whole sheet is ~1.6 MB; the summary travels as
// columns (`SheetSummary.columns`), since per-row keys would be most of the page's data.
import type { FeasibilitySheet, ObservationSheet, SheetNight } from "./feasibility";

export type ObservationSummary = Pick<
  ObservationSheet,
  "observationId" | "targetName" | "telescopeName" | "instrumentName" | "band" | "moonCategory" | "maxAirmass" | "requestedHoursThisSemester"
> & {
  usableHours: number;
  /** the target's, for the sheet's table (null when the target is gone) */
  raDeg: number | null;
  decDeg: number | null;
  magnitude: number | null;
  magnitudeBand: string | null;
};

const SUMMARY_KEYS = [
  "observationId", "targetName", "telescopeName", "instrumentName", "band", "moonCategory", "maxAirmass", "requestedHoursThisSemester",
  "usableHours", "raDeg", "decDeg", "magnitude", "magnitudeBand",
] as const satisfies readonly (keyof ObservationSummary)[];

export type Columns<T> = { [K in keyof T]: T[K][] };

export type SheetSummary = Omit<FeasibilitySheet, "observations" | "targets" | "sites"> & { columns: Columns<ObservationSummary> };

/** One observation's card in full, with its telescope's nights (date and moon category, for its chart). */
export type ObservationDetails = { observation: ObservationSheet; nights: Pick<SheetNight, "date" | "moonCategory">[] };

export function toColumns<T extends object>(rows: T[], keys: readonly (keyof T)[]): Columns<T> {
  const out = {} as Columns<T>;
  for (const key of keys) out[key] = rows.map((row) => row[key]);
  return out;
}

export function fromColumns<T extends object>(columns: Columns<T>): T[] {
  const keys = Object.keys(columns) as (keyof T)[];
  const length = keys.length ? columns[keys[0]].length : 0;
  return Array.from({ length }, (_, i) => {
    const row = {} as T;
    for (const key of keys) row[key] = columns[key][i];
    return row;
  });
}

export function sheetSummary(sheet: FeasibilitySheet): SheetSummary {
  const { observations, targets, sites: _sites, ...rest } = sheet;
  const targetOf = new Map(targets.map((t) => [t.targetId, t]));
  const rows = observations.map((o): ObservationSummary => {
    const t = targetOf.get(o.targetId);
    return {
      observationId: o.observationId,
      targetName: o.targetName,
      telescopeName: o.telescopeName,
      instrumentName: o.instrumentName,
      band: o.band,
      moonCategory: o.moonCategory,
      maxAirmass: o.maxAirmass,
      requestedHoursThisSemester: o.requestedHoursThisSemester,
      usableHours: o.visibility.usableHours,
      raDeg: t?.raDeg ?? null,
      decDeg: t?.decDeg ?? null,
      magnitude: t?.magnitude ?? null,
      magnitudeBand: t?.band ?? null,
    };
  });
  return { ...rest, columns: toColumns(rows, SUMMARY_KEYS) };
}

export function observationDetails(sheet: FeasibilitySheet, observationId: number): ObservationDetails | null {
  const observation = sheet.observations.find((o) => o.observationId === observationId);
  if (!observation) return null;
  const nights = (sheet.sites[observation.telescopeId]?.nights ?? []).map((n) => ({ date: n.date, moonCategory: n.moonCategory }));
  return { observation, nights };
}
