// Conventions of astro/visibility: the site, the moon categories and their thresholds, twilight,
// refraction, the sidereal rate.

import type { MoonCategory } from "../../domain";

export type Site = { latitudeDeg: number; longitudeDeg: number; elevationM: number; timeZone: string };

export type { MoonCategory };

/**
 * Moon categories. Time counts as dark while the Moon's centre is below the horizon (geometric
 * altitude < 0°) or its illuminated fraction is below `darkBelow`; grey while it is up and lit
 * `darkBelow`–`greyBelow`; bright while it is up and lit at least `greyBelow`. The fraction is
 * the night's, at mid-darkness (it changes by < 0.06 within a night). A night's single
 * `moonCategory` is the category of its illuminated fraction at mid-darkness.
 */
export const MOON_CATEGORY_THRESHOLDS = {
  /** dark when the illuminated fraction is below this */
  darkBelow: 0.35,
  /** grey when below this (and not dark); bright otherwise */
  greyBelow: 0.7,
} as const;

export const MOON_TIME_RULE =
  "Moon time is split at moonrise and moonset: dark while the Moon's centre is below the horizon (geometric altitude < 0°) or it is less than 35 % lit; grey while it is up and 35–70 % lit; bright while it is up and at least 70 % lit (illuminated fraction at mid-darkness).";

export const TWILIGHT_ALTITUDE_DEG = -18;
export const REFRACTION_MODEL = "none (geometric altitudes) for targets and twilight; sunset/sunrise with 34′ horizontal refraction scaled by air density";

export function moonCategory(illumination: number): MoonCategory {
  if (illumination < MOON_CATEGORY_THRESHOLDS.darkBelow) return "dark";
  if (illumination < MOON_CATEGORY_THRESHOLDS.greyBelow) return "grey";
  return "bright";
}

/** Earth's sidereal rotation (deg per mean solar day); local sidereal time grows at this rate. */
export const SIDEREAL_RATE_DEG_PER_DAY = 360.98564736629;
