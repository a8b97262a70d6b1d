import { EpochTool, type EpochAnswer, type EpochForm } from "~/components/sky-tools/EpochTool";
import { ExposureTool, type ExposureAnswer, type ExposureForm } from "~/components/sky-tools/ExposureTool";
import type { SkyTelescope } from "~/components/sky-tools/live";
import { VisibilityTool, type VisibilityAnswer, type VisibilityForm } from "~/components/sky-tools/VisibilityTool";
import { AIRMASS_FORMULA } from "~/lib/astro/airmass";
import { planEpochs } from "~/lib/astro/astrometry";
import { computeExposure } from "~/lib/astro/exposure";
import { ZERO_POINTS } from "~/lib/astro/photometry";
import { officeSemesters } from "~/lib/office/semesters.server";
import { telescopeSites } from "~/lib/office/telescopes.server";
import { MOON_CATEGORY_THRESHOLDS, REFRACTION_MODEL, altitudeCurve, computeVisibility, type Site } from "~/lib/astro/visibility";
import type { Route } from "./+types/sky-tools";

export const meta: Route.MetaFunction = () => [{ title: "Sky tools · Nightshare" }];

// Used only when the observatory has no telescope yet ("Custom site"): a site of our own choosing.
const FALLBACK_SITE: Site = { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" };
const FALLBACK_SCOPE = { apertureM: 2.4, centralObstruction: 0.3 };
// An invented field; semester 2027B.
const TARGET = { ra: "05:36:48", dec: "+18:30:00", raDeg: 84.2, decDeg: 18.5 };

// Public page: no sign-in. The first answers are computed here, for the observatory's first
// telescope, so that the page is useful before any script runs; the forms then recompute live
// through the JSON API (the same computations).
export async function loader() {
  const telescopes: SkyTelescope[] = await telescopeSites();
  const scope = telescopes[0];
  const site: Site = scope
    ? { latitudeDeg: scope.latitudeDeg, longitudeDeg: scope.longitudeDeg, elevationM: scope.elevationM, timeZone: scope.timeZone }
    : FALLBACK_SITE;
  const choice = scope ? String(scope.id) : "custom";
  const optics = scope ? { apertureM: scope.apertureM, centralObstruction: scope.centralObstruction } : FALLBACK_SCOPE;

  const vis: VisibilityForm = {
    telescope: choice, lat: String(site.latitudeDeg), lon: String(site.longitudeDeg), elevation: String(site.elevationM), timeZone: site.timeZone,
    ra: TARGET.ra, dec: TARGET.dec, from: "2027-08-01", nights: "183", minAltitude: "", maxAirmass: "1.6", night: "2027-11-15",
  };
  const exp: ExposureForm = {
    telescopeId: choice, band: "V", magnitude: "20.5", mode: "snr", snr: "50", exposureSeconds: "", airmass: "1.2", seeingArcsec: "1.1", moonCategory: "dark",
    telescope: { apertureM: String(optics.apertureM), centralObstruction: String(optics.centralObstruction) },
    instrument: { throughput: "0.55", pixelScaleArcsec: "0.35", readNoiseE: "4", darkEPerPixelPerS: "0.001", fullWellE: "90000" },
  };
  const epoch: EpochForm = {
    telescopeId: choice,
    site: { latitudeDeg: String(site.latitudeDeg), longitudeDeg: String(site.longitudeDeg), elevationM: String(site.elevationM), timeZone: site.timeZone },
    target: { ra: TARGET.ra, dec: TARGET.dec }, firstDate: "2027-08-01", baselineYears: "3", goal: "velocity", epochs: "8",
    requiredProperMotionMasPerYr: "", requiredTangentialVelocityKmS: "5", distancePc: "1500", perEpochPrecisionMas: "4", maxAirmass: "1.6",
    secondsPerEpoch: "1500",
  };

  const target = { raDeg: TARGET.raDeg, decDeg: TARGET.decDeg };
  const visibility = computeVisibility({ site, target, from: vis.from, nights: 183, limit: { maxAirmass: 1.6 } });
  const { night, points } = altitudeCurve(site, target, vis.night, 10);
  const iso = (t: number | null) => (t === null ? null : new Date(t).toISOString());
  const curve = { date: vis.night, sunset: iso(night.sunset), sunrise: iso(night.sunrise), darkStart: iso(night.darkStart), darkEnd: iso(night.darkEnd), points };
  const exposure = computeExposure({
    band: "V", magnitude: 20.5, snr: 50, airmass: 1.2, seeingArcsec: 1.1, moonCategory: "dark",
    telescope: optics,
    instrument: { throughput: 0.55, pixelScaleArcsec: 0.35, readNoiseE: 4, darkEPerPixelPerS: 0.001, fullWellE: 90000 },
  });
  const plan = planEpochs({
    site, target, firstDate: "2027-08-01", baselineYears: 3, perEpochPrecisionMas: 4, limit: { maxAirmass: 1.6 },
    required: { tangentialVelocityKmS: 5, distancePc: 1500 }, secondsPerEpoch: 1500, semesters: await officeSemesters(),
  });
  return {
    telescopes,
    defaults: { vis, exp, epoch },
    visibility: { ...visibility, curve } as VisibilityAnswer,
    exposure: { ...exposure, zeroPointPhotons: ZERO_POINTS.V.photonsPerSecondCm2 } as ExposureAnswer,
    plan: { ...plan, perEpochPrecisionMas: 4 } as EpochAnswer,
  };
}

export default function SkyTools({ loaderData }: Route.ComponentProps) {
  return (
    <div className="space-y-8">
      <header className="space-y-2">
        <h1>Sky tools</h1>
        <p className="max-w-3xl text-slate-600">
          The calculators behind every feasibility sheet, open to anyone. They start at the observatory's telescopes (choose “Custom site” for coordinates of your own); change a field and the numbers follow. The same computations answer at{" "}
          <code>/api/v1/visibility</code>, <code>/api/v1/exposure</code>, <code>/api/v1/astrometry</code> and <code>/api/v1/epoch-plan</code>.
        </p>
        <ul className="grid gap-x-6 gap-y-1 text-xs text-slate-600 md:grid-cols-2">
          <li>
            <b>Moon time</b> is split at moonrise and moonset: dark while the Moon is below the horizon or less than{" "}
            {MOON_CATEGORY_THRESHOLDS.darkBelow * 100} % lit, grey while up and {MOON_CATEGORY_THRESHOLDS.darkBelow * 100}–{MOON_CATEGORY_THRESHOLDS.greyBelow * 100} % lit, bright while up and at least {MOON_CATEGORY_THRESHOLDS.greyBelow * 100} % lit. A night's single category is that of its illuminated fraction at mid-darkness.
          </li>
          <li><b>Twilight</b>: astronomical, the Sun's centre 18° below the horizon (geometric). Times in UTC, with the site's local time beside them.</li>
          <li><b>Air mass</b>: {AIRMASS_FORMULA}, from the geometric altitude.</li>
          <li><b>Refraction</b>: {REFRACTION_MODEL}.</li>
        </ul>
      </header>
      <VisibilityTool defaults={loaderData.defaults.vis} initial={loaderData.visibility} telescopes={loaderData.telescopes} />
      <ExposureTool defaults={loaderData.defaults.exp} initial={loaderData.exposure} telescopes={loaderData.telescopes} />
      <EpochTool defaults={loaderData.defaults.epoch} initial={loaderData.plan} telescopes={loaderData.telescopes} />
    </div>
  );
}
