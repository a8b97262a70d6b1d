// The invented Kestrel Ridge Observatory: one site (coordinates of our own choosing, not a real
// observatory's), a 2.4 m and a 1.0 m telescope with one CCD imager each, and calls 2027A and 2027B.
import type { Sequelize } from "sequelize";
import { Call, CallOffer, Filter, Instrument, Telescope } from "~/models/index.server";
import { addDays, max } from "date-fns";

export const site = {
  siteName: "Kestrel Ridge",
  latitudeDeg: 38.9124,
  longitudeDeg: -112.5407,
  elevationM: 2350,
  timeZone: "America/Denver",
};

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
    const now = new Date();
    const calls = [
      {
        semesterCode: "2027A",
        title: "Call for proposals 2027A",
        opensAt: new Date("2026-10-15T00:00:00Z"),
        deadlineAt: max([new Date("2027-01-15T23:59:00Z"), addDays(now, 30)]),
        semesterStart: "2027-02-01",
        semesterEnd: "2027-07-31",
        pageLimit: 4,
        currency: "eur",
        accessFeePerHourCents: 95_000,
        pageChargeCents: 18_000,
      },
      {
        semesterCode: "2027B",
        title: "Call for proposals 2027B",
        opensAt: new Date("2027-04-01T00:00:00Z"),
        deadlineAt: max([new Date("2027-06-15T23:59:00Z"), addDays(now, 60)]),
        semesterStart: "2027-08-01",
        semesterEnd: "2028-01-31",
        pageLimit: 4,
        currency: "eur",
        accessFeePerHourCents: 95_000,
        pageChargeCents: 18_000,
      },
    ];
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
