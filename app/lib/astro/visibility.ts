// Night-by-night visibility of a fixed target from a site (SPEC §3.1).
//
// Conventions
// - Target: ICRS/J2000 direction carried to the night by its proper motion, corrected for
//   annual aberration (Earth's heliocentric velocity, as astronomy-engine does for its
//   user-defined stars), then rotated to the true equator and equinox of date (precession +
//   nutation, astronomy-engine's Rotation_EQJ_EQD). Altitudes are GEOMETRIC: no refraction is
//   applied to the target or to twilight, so an altitude limit means the unrefracted altitude
//   (refraction would lift a 30° limit by ~1.7′, a 20° limit by ~2.6′).
// - Sunset and sunrise follow astronomy-engine's SearchRiseSet: the Sun's upper limb at
//   −34′ × (air density at the site relative to sea level). Astronomical twilight: the Sun's
//   centre at −18°, geometric, topocentric (common practice).
// - A night is framed from the Sun's upper transit nearest local clock noon of its `date` (the
//   local calendar date on which the night begins) to the next upper transit. Inside a frame
//   the Sun goes down once and up once, so each event happens at most once.
// - Speed: everything that depends only on the site and the dates (Sun on a daily grid,
//   precession–nutation matrices, sidereal time, Earth's velocity, Moon) is computed once by
//   `prepareSiteNights`. Crossings are solved in closed form from the hour angle,
//   cos H = (sin h0 − sin φ sin δ) / (cos φ cos δ), iterated for the moving Sun.
//
// The parts live in ./visibility/: conventions (moon categories, twilight, refraction), the Sun's
// track, the Moon, site nights, target windows and the JSON answer; this module is their public
// face.

export {
  MOON_CATEGORY_THRESHOLDS,
  MOON_TIME_RULE,
  REFRACTION_MODEL,
  SIDEREAL_RATE_DEG_PER_DAY,
  TWILIGHT_ALTITUDE_DEG,
  moonCategory,
  type MoonCategory,
  type Site,
} from "./visibility/conventions";
export { hourAngleAtAltitude } from "./visibility/sun-track";
export { ensureMoonTimes, hoursByMoon, moonAllows, moonIllumination, moonSegments, type MoonTimes } from "./visibility/moon";
export { clearSiteCache, localSiderealDeg, prepareSiteNights, siteLocalDate, type Interval, type PreparedSite, type SiteNight } from "./visibility/site-nights";
export { apparentPlace, limitAltitude, targetNights, targetWindows, type Limit, type TargetNight } from "./visibility/target-windows";
export {
  altitudeCurve,
  computeVisibility,
  darkHoursByMoon,
  summarise,
  type CurvePoint,
  type NightJson,
  type SemesterSummary,
  type VisibilityInput,
  type VisibilityJson,
} from "./visibility/json";
