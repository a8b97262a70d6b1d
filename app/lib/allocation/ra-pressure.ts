// RA pressure of one telescope over a semester (SPEC §3.4, issue 12): 24 one-hour bins of right
// ascension. A target at RA α transits when the local sidereal time is α, so the time a bin
// offers is the time during which the LST lies in it.
//
// - Available: every night's dark interval (Sun below −18°, astro/visibility.ts) cut at moonrise
//   and moonset into moon categories (the night's category while the Moon is up, dark while it
//   is down: `moonSegments`), each piece spread over the bins by the LST at each instant. Times
//   the telescope's clear fraction for the month of the night's local date (an office setting;
//   a month without one counts as 1 and is reported as not set).
// - Requested: each observation's hours in the call's semester spread over the bins in
//   proportion to the hours of its target's observable windows (above its airmass limit, in the
//   dark) that fall in each bin, counting only the windows' time in its moon category or darker
//   — the time the feasibility sheet calls usable. The hours go to the observation's own moon
//   category. An observation with no usable time cannot be placed: its hours are reported apart.
// Pure: plain data in and out; the server part (ra-pressure.server.ts) loads the inputs.
import type { Target } from "../astro/coordinates";
import { DAY_MS } from "../astro/time";
import {
  SIDEREAL_RATE_DEG_PER_DAY,
  ensureMoonTimes,
  localSiderealDeg,
  moonAllows,
  moonSegments,
  targetNights,
  type Interval,
  type PreparedSite,
  type SiteNight,
} from "../astro/visibility";
import { moonCategories, type MoonCategory } from "../domain";

export const RA_BINS = 24;
const CATEGORIES = moonCategories;
const DEG_PER_MS = SIDEREAL_RATE_DEG_PER_DAY / DAY_MS;
const HOUR_MS = 3_600_000;

export type MoonHours = Record<MoonCategory, number>;

export type RaObservation = {
  observationId: number;
  proposalId: number;
  target: Target;
  /** the observation's altitude limit (from its airmass limit) */
  minAltitudeDeg: number;
  /** the brightest moon it tolerates */
  moonCategory: MoonCategory;
  /** hours requested in the call's semester */
  requestedHours: number;
};

export type RaBin = {
  /** the bin holds LST (= RA at transit) from raHour to raHour + 1 */
  raHour: number;
  /** dark hours in the bin, before the clear fraction */
  darkHours: number;
  /** after the clear fraction */
  availableDarkHours: number;
  requestedHours: number;
  byMoonCategory: Record<MoonCategory, { darkHours: number; availableDarkHours: number; requestedHours: number }>;
};

export type ClearFractionUsed = { month: number; clearFraction: number; set: boolean; nights: number };

export type RaPressure = {
  bins: RaBin[];
  /** Σ over the semester's nights of the dark interval (Sun below −18°) */
  darkHours: number;
  availableDarkHours: number;
  /** requested hours placed in the bins */
  requestedHours: number;
  /** observations with requested hours but no usable window: not in the bins */
  unplaced: { observationId: number; proposalId: number; hours: number }[];
  /** the months of the semester's nights in order, with the fraction used */
  clearFractions: ClearFractionUsed[];
  nights: number;
};

const zeroHours = (): MoonHours => ({ dark: 0, grey: 0, bright: 0 });

/**
 * Adds the solar-time hours of [start, end] to `bins` by the local sidereal time at each instant
 * (LST grows linearly with time: 15° per bin, at the sidereal rate).
 */
export function spreadOverLst(night: SiteNight, longitudeDeg: number, piece: Interval, add: (bin: number, hours: number) => void): void {
  if (piece.end <= piece.start) return;
  let s = localSiderealDeg(night, longitudeDeg, piece.start);
  s -= 360 * Math.floor(s / 360);
  let remaining = DEG_PER_MS * (piece.end - piece.start);
  while (remaining > 1e-12) {
    const k = Math.floor(s / 15);
    const step = Math.min((k + 1) * 15 - s, remaining);
    add(k % RA_BINS, step / DEG_PER_MS / HOUR_MS);
    s += step;
    remaining -= step;
  }
}

/** Month (1–12) of a night's local date, whose clear fraction applies to it. */
const monthOf = (night: SiteNight) => Number(night.date.slice(5, 7));

export function raPressure(input: {
  prepared: PreparedSite;
  /** office setting per month (1–12); a missing month counts as 1 */
  clearFractions: { month: number; clearFraction: number }[];
  observations: RaObservation[];
}): RaPressure {
  const { prepared } = input;
  const lon = prepared.site.longitudeDeg;
  ensureMoonTimes(prepared);
  const setting = new Map(input.clearFractions.map((c) => [c.month, c.clearFraction]));
  const dark = Array.from({ length: RA_BINS }, zeroHours);
  const available = Array.from({ length: RA_BINS }, zeroHours);
  const requested = Array.from({ length: RA_BINS }, zeroHours);
  const months = new Map<number, ClearFractionUsed>();
  let darkTotal = 0;

  for (const night of prepared.nights) {
    const month = monthOf(night);
    const used = months.get(month) ?? { month, clearFraction: setting.get(month) ?? 1, set: setting.has(month), nights: 0 };
    used.nights += 1;
    months.set(month, used);
    if (night.darkStart === null || night.darkEnd === null) continue;
    darkTotal += (night.darkEnd - night.darkStart) / HOUR_MS;
    for (const piece of moonSegments(night, [{ start: night.darkStart, end: night.darkEnd }])) {
      spreadOverLst(night, lon, piece, (bin, hours) => {
        dark[bin][piece.category] += hours;
        available[bin][piece.category] += hours * used.clearFraction;
      });
    }
  }

  const unplaced: RaPressure["unplaced"] = [];
  let requestedTotal = 0;
  const weights = new Array<number>(RA_BINS);
  for (const obs of input.observations) {
    if (!(obs.requestedHours > 0)) continue;
    weights.fill(0);
    let usable = 0;
    for (const row of targetNights(prepared, obs.target, obs.minAltitudeDeg)) {
      if (row.windows.length === 0) continue;
      for (const piece of moonSegments(row.night, row.windows)) {
        if (!moonAllows(obs.moonCategory, piece.category)) continue;
        spreadOverLst(row.night, lon, piece, (bin, hours) => {
          weights[bin] += hours;
          usable += hours;
        });
      }
    }
    if (usable <= 0) {
      unplaced.push({ observationId: obs.observationId, proposalId: obs.proposalId, hours: obs.requestedHours });
      continue;
    }
    for (let k = 0; k < RA_BINS; k++) requested[k][obs.moonCategory] += (obs.requestedHours * weights[k]) / usable;
    requestedTotal += obs.requestedHours;
  }

  const sum = (h: MoonHours) => h.dark + h.grey + h.bright;
  const bins: RaBin[] = dark.map((d, k) => ({
    raHour: k,
    darkHours: sum(d),
    availableDarkHours: sum(available[k]),
    requestedHours: sum(requested[k]),
    byMoonCategory: Object.fromEntries(
      CATEGORIES.map((c) => [c, { darkHours: d[c], availableDarkHours: available[k][c], requestedHours: requested[k][c] }]),
    ) as RaBin["byMoonCategory"],
  }));
  return {
    bins,
    darkHours: darkTotal,
    availableDarkHours: bins.reduce((s, b) => s + b.availableDarkHours, 0),
    requestedHours: requestedTotal,
    unplaced,
    clearFractions: [...months.values()],
    nights: prepared.nights.length,
  };
}
