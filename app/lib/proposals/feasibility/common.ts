// Small helpers the parts of the feasibility sheet share.

import type { Target as AstroTarget } from "../../astro/coordinates";
import { dayNumber } from "../../astro/time";
import type { MoonCategory } from "../../astro/visibility";
import type { SheetTarget } from "./types";

export const r = (x: number, digits = 2) => Math.round(x * 10 ** digits) / 10 ** digits;
export const splitRounded = (x: Record<MoonCategory, number>, digits: number) => ({ dark: r(x.dark, digits), grey: r(x.grey, digits), bright: r(x.bright, digits) });

export function nightsInSemester(start: string, end: string): number {
  return dayNumber(end) - dayNumber(start) + 1;
}

export function astroTarget(t: SheetTarget): AstroTarget {
  return { raDeg: t.raDeg, decDeg: t.decDeg, pmRaCosDecMasPerYr: t.pmRaMasPerYr ?? 0, pmDecMasPerYr: t.pmDecMasPerYr ?? 0 };
}
