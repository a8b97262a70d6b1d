// The invented Kestrel Ridge Observatory: one site, a 2.4 m and a 1.0 m telescope with one CCD
// imager each, and three calls placed relative to the day the demo is seeded (see demoCallPlan).
//
// The site. The Kestrel Ridge Consortium is invented; its office is seated in the United Kingdom
// (an invented office in a real country), so its charges are in pounds sterling and its numbers
// are written the British way (1,234.5; £950). Its telescopes stand at coordinates of our own
// choosing on a mountain crest of the Iberian interior (40.26° N, 5.21° W) that runs at about
// 2,000–2,600 m there, so 2,350 m is plausible for a saddle of the ridge. Checked from memory
// against the major observatory sites: none stands on that crest, the nearest is over 300 km away.
import type { Sequelize } from "sequelize";
import { Call, CallOffer, Filter, Instrument, Telescope } from "~/models/index.server";
import { addDays } from "date-fns";
import { defaultSemesterSpan, nextSemesterCode, semesterOf, type SemesterSpan } from "~/lib/semesters";

export const site = {
  siteName: "Kestrel Ridge",
  latitudeDeg: 40.2618,
  longitudeDeg: -5.2093,
  elevationM: 2350,
  timeZone: "Europe/Madrid",
};

/** Where the consortium is seated decides the currency of its calls. */
export const consortium = { seat: "United Kingdom", currency: "gbp", accessFeePerHourCents: 82_000, pageChargeCents: 15_000 };

const DAY = 86_400_000;

const semesterCodeOf = (date: Date) => semesterOf(date.toISOString().slice(0, 10));
const nextSemester = (code: string) => nextSemesterCode(code) as string;

/** The demo calls keep the default semester dates (A 1 Feb – 31 Jul, B 1 Aug – 31 Jan). */
function semesterDates(code: string) {
  const span = defaultSemesterSpan(code) as SemesterSpan;
  return { semesterStart: span.start, semesterEnd: span.end };
}

const day = (d: Date) => new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), 23, 59));

/**
 * The three calls of the demo, relative to the seeding day, so that a newcomer always finds every
 * stage: the semester now running (its call long closed, its proposals decided), the next
 * semester (its call past its deadline, the proposals submitted and waiting for review), and the
 * one after (its call open, deadline 45 days ahead, always before that semester starts).
 */
export function demoCallPlan(now = new Date()) {
  const running = semesterCodeOf(now);
  const review = nextSemester(running);
  const open = nextSemester(review);
  const make = (semesterCode: string, opensAt: Date, deadlineAt: Date) => ({
    semesterCode,
    title: `Call for proposals ${semesterCode}`,
    opensAt,
    deadlineAt,
    ...semesterDates(semesterCode),
    pageLimit: 4,
    currency: consortium.currency,
    accessFeePerHourCents: consortium.accessFeePerHourCents,
    pageChargeCents: consortium.pageChargeCents,
  });
  const runningStart = new Date(`${semesterDates(running).semesterStart}T00:00:00Z`);
  return {
    running: make(running, new Date(runningStart.getTime() - 150 * DAY), day(new Date(runningStart.getTime() - 75 * DAY))),
    review: make(review, new Date(now.getTime() - 80 * DAY), day(new Date(now.getTime() - 10 * DAY))),
    open: make(open, new Date(now.getTime() - 5 * DAY), day(addDays(now, 45))),
  };
}

// Zero points: Bessell, Castelli & Plez 1998 (A&A 333, 231), table A2, f_λ at magnitude 0 in
// 1e-9 erg s⁻¹ cm⁻² Å⁻¹, with effective wavelengths and FWHM bandwidths of Bessell 1990 (PASP 102,
// 1181), turned into photons s⁻¹ cm⁻² over the band: N = f_λ · Δλ · λ / (h c).
const bandValues = {
  U: { fLambda: 4.175, lambdaA: 3600, widthA: 660, k: 0.5, sky: [21.9, 20.2, 18.3] },
  B: { fLambda: 6.32, lambdaA: 4380, widthA: 940, k: 0.25, sky: [22.5, 21.2, 19.5] },
  V: { fLambda: 3.631, lambdaA: 5450, widthA: 880, k: 0.14, sky: [21.6, 20.7, 19.4] },
  R: { fLambda: 2.177, lambdaA: 6410, widthA: 1380, k: 0.1, sky: [20.8, 20.1, 19.1] },
  I: { fLambda: 1.126, lambdaA: 7980, widthA: 1490, k: 0.06, sky: [19.8, 19.4, 18.7] },
} as const;
// Extinction k (mag per airmass): typical values for a good continental site, from memory of
// common practice, not a measurement. Night-sky brightness (mag/arcsec², zenith, dark/grey/bright):
// Kestrel Ridge's own INVENTED values (the site is invented; they are neither measured nor copied
// from any observatory's table), chosen to be plausible for a 2350 m continental site. The dark
// value is the zenith dark sky that the Krisciunas & Schaefer moonlight model starts from.

const hcErgAngstrom = 6.62607015e-27 * 2.99792458e18;

function filterRows(instrumentId: number) {
  return Object.entries(bandValues).map(([band, v]) => ({
    instrumentId,
    band,
    zeroPointPhotons: Math.round((v.fLambda * 1e-9 * v.widthA * v.lambdaA) / hcErgAngstrom),
    extinctionMagPerAirmass: v.k,
    skyDarkMag: v.sky[0],
    skyGreyMag: v.sky[1],
    skyBrightMag: v.sky[2],
  }));
}

const telescopes = [
  {
    telescope: { name: "KRO 2.4 m", apertureM: 2.4, centralObstruction: 0.33 },
    // Detector and overhead values typical of a thinned back-illuminated 4k CCD imager on a 2-m class
    // telescope, and of a 2k imager on a 1-m (from memory of common practice, not a real camera).
    instrument: {
      name: "Ridge Imager 4K", pixelScaleArcsec: 0.3, readNoiseE: 4.5, darkEPerPixelPerS: 0.0008,
      gainEPerAdu: 1.5, fullWellE: 150_000, readoutSeconds: 35, acquisitionSeconds: 240,
      astrometricFloorMas: 2.5, throughput: 0.42,
    },
    offers: { dark: 420, grey: 380, bright: 400 },
  },
  {
    telescope: { name: "KRO 1.0 m", apertureM: 1.0, centralObstruction: 0.4 },
    instrument: {
      name: "Ridge Imager 2K", pixelScaleArcsec: 0.55, readNoiseE: 7, darkEPerPixelPerS: 0.002,
      gainEPerAdu: 2, fullWellE: 100_000, readoutSeconds: 15, acquisitionSeconds: 150,
      astrometricFloorMas: 5, throughput: 0.38,
    },
    offers: { dark: 520, grey: 460, bright: 480 },
  },
];

export async function up({ context: sequelize }: { context: Sequelize }) {
  await sequelize.transaction(async (transaction) => {
    const plan = demoCallPlan();
    const calls = [plan.running, plan.review, plan.open];
    const callRows = [];
    for (const values of calls) {
      const [call] = await Call.findOrCreate({ where: { semesterCode: values.semesterCode }, defaults: values, transaction });
      callRows.push(call);
    }
    for (const entry of telescopes) {
      const [telescope] = await Telescope.findOrCreate({
        where: { name: entry.telescope.name },
        defaults: { ...site, ...entry.telescope },
        transaction,
      });
      const [instrument] = await Instrument.findOrCreate({
        where: { telescopeId: telescope.id, name: entry.instrument.name },
        defaults: { ...entry.instrument, telescopeId: telescope.id },
        transaction,
      });
      for (const row of filterRows(instrument.id)) {
        await Filter.findOrCreate({ where: { instrumentId: instrument.id, band: row.band }, defaults: row, transaction });
      }
      for (const call of callRows) {
        for (const [moonCategory, hoursOffered] of Object.entries(entry.offers)) {
          await CallOffer.findOrCreate({
            where: { callId: call.id, telescopeId: telescope.id, moonCategory: moonCategory as "dark" },
            defaults: { callId: call.id, telescopeId: telescope.id, moonCategory: moonCategory as "dark", hoursOffered },
            transaction,
          });
        }
      }
    }
  });
}

export async function down() {}
