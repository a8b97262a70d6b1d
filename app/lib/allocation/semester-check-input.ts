// From the facts the database holds (board order, tiers, allocations, clear fractions and each
// programme's feasibility input) to the semester check's input: the feasibility sheet gives each
// observation's telescope, moon category, time per epoch and epochs with their windows; the
// visibility module gives the site's nights (darkness, Moon-up time) and each target's windows.
// Pure (no database): it runs in the check's worker thread.
import { dayNumber, DAY_MS } from "~/lib/astro/time";
import { ensureMoonTimes, limitAltitude, prepareSiteNights, targetNights, type Site } from "~/lib/astro/visibility";
import type { AllocationTier, MoonCategory } from "~/lib/domain";
import { buildFeasibilitySheet, nightsInSemester, type FeasibilityInput } from "~/lib/proposals/feasibility";
import type { CheckInput, CheckObservation, CheckProgramme, CheckTelescope } from "./semester-check";

export type CheckFacts = {
  call: { id: number; semesterCode: string; semesterStart: string; semesterEnd: string };
  /** telescopes the call offers time on; clear fraction per month 1–12 (index 0–11), null = none set */
  telescopes: { id: number; name: string; site: Site; clearFractions: (number | null)[] }[];
  /** programmes with a tier, in the board's order (position 1 = top) */
  programmes: {
    proposalId: number;
    code: string | null;
    title: string;
    tier: AllocationTier;
    position: number;
    allocation: { telescopeId: number; moonCategory: MoonCategory; hours: number }[];
    feasibility: FeasibilityInput;
  }[];
};

export const siteKey = (s: Site) => `${s.latitudeDeg}|${s.longitudeDeg}|${s.elevationM}`;

export function checkInputFromFacts(facts: CheckFacts): CheckInput {
  const { call } = facts;
  const count = nightsInSemester(call.semesterStart, call.semesterEnd);
  const first = dayNumber(call.semesterStart);
  const telescopes: CheckTelescope[] = facts.telescopes.map((t) => {
    const prepared = prepareSiteNights(t.site, call.semesterStart, count);
    ensureMoonTimes(prepared);
    return {
      telescopeId: t.id,
      name: t.name,
      siteKey: siteKey(t.site),
      clearFractions: t.clearFractions,
      nights: prepared.nights.map((n) => ({
        date: n.date,
        month: Number(n.date.slice(5, 7)),
        darkStart: n.darkStart,
        darkEnd: n.darkEnd,
        moonUp: n.moon?.up ?? [],
        upCategory: n.moonCategory,
      })),
    };
  });
  const siteOf = new Map(facts.telescopes.map((t) => [t.id, t.site]));

  const programmes: CheckProgramme[] = facts.programmes.map((p) => {
    const notes: string[] = [];
    const sheet = buildFeasibilitySheet(p.feasibility);
    const observations: CheckObservation[] = [];
    for (const o of sheet.observations) {
      const label = `${o.targetName} (${o.telescopeName}, ${o.band})`;
      const site = siteOf.get(o.telescopeId);
      const target = p.feasibility.targets.find((t) => t.id === o.targetId);
      const source = p.feasibility.observations.find((x) => x.id === o.observationId);
      if (!site || !target || !source) {
        notes.push(`${label}: ${o.telescopeName} offers no time in this call; not simulated.`);
        continue;
      }
      const prepared = prepareSiteNights(site, call.semesterStart, count);
      const rows = targetNights(
        prepared,
        { raDeg: target.raDeg, decDeg: target.decDeg, pmRaCosDecMasPerYr: target.pmRaMasPerYr ?? 0, pmDecMasPerYr: target.pmDecMasPerYr ?? 0 },
        limitAltitude({ maxAirmass: source.maxAirmass }),
        { moonSplit: false },
      );
      const seconds = o.timePerEpoch.totalSeconds;
      if (seconds === null) notes.push(`${label}: the time per epoch is unknown (no exposure), so it is not simulated.`);
      let astrometry: CheckObservation["astrometry"] = null;
      let visits = o.epochsThisSemester;
      if (o.astrometry) {
        const a = o.astrometry;
        const here = a.epochs.filter((e) => e.semesterCode === call.semesterCode && e.status === "planned");
        const nightOf = (date: string) => Math.min(Math.max(dayNumber(date) - first, 0), count - 1);
        astrometry = {
          raDeg: target.raDeg,
          decDeg: target.decDeg,
          perEpochPrecisionMas: a.perEpochPrecisionMas,
          requiredPmPrecisionMasPerYr: a.requiredPmPrecisionMasPerYr,
          epochs: here
            .map((e) => ({
              date: e.date,
              fromNight: nightOf(e.window?.from ?? e.date) - (e.window ? 0 : a.toleranceNights),
              toNight: nightOf(e.window?.to ?? e.date) + (e.window ? 0 : a.toleranceNights),
            }))
            .map((e) => ({ ...e, fromNight: Math.max(0, e.fromNight), toNight: Math.min(count - 1, e.toNight) }))
            .sort((x, y) => x.date.localeCompare(y.date)),
          // the other semesters' epochs (and any already observed) as planned, at 00:00 UTC of their date
          otherEpochTimes: a.epochs.filter((e) => !here.includes(e) && e.status !== "missed").map((e) => dayNumber(e.date) * DAY_MS),
        };
        visits = here.length;
      }
      observations.push({
        observationId: o.observationId,
        label,
        telescopeId: o.telescopeId,
        moonCategory: o.moonCategory,
        visitHours: seconds === null ? 0 : seconds / 3600,
        visits,
        windows: rows.map((r) => r.windows),
        astrometry,
      });
    }
    return {
      proposalId: p.proposalId,
      code: p.code,
      title: p.title,
      tier: p.tier,
      position: p.position,
      allocation: p.allocation,
      observations,
      notes,
    };
  });
  return { semesterCode: call.semesterCode, telescopes, programmes };
}
