// The science API behind api.v1.visibility / exposure / astrometry / epoch-plan: validation,
// telescope and instrument look-ups, a per-IP budget weighed by each request's cost, the heavy
// computations in a worker pool, and JSON errors (400/429/503 with Retry-After, never 500).
import { isIPv4, isIPv6 } from "node:net";
import { data } from "react-router";
import type { z } from "zod";
import { apiIssues } from "~/lib/forms";
import { Lru } from "~/lib/lru";
import { officeSemesters } from "~/lib/office/semesters.server";
import { instrumentWithFilters, telescopeById, type Telescope } from "~/lib/office/science-lookups.server";
import { astrometryForDates, centroidPrecisionMas, epochPrecisionMas, type FitPrecision, type Plan } from "~/lib/astro/astrometry";
import { computePool, PoolBusy, PoolTimeout } from "~/lib/astro/compute-pool.server";
import { computeExposure, type ExposureInput } from "~/lib/astro/exposure";
import type { Band } from "~/lib/astro/bands";
import { EXTINCTION, SKY_BRIGHTNESS, ZERO_POINTS } from "~/lib/astro/photometry";
import {
  astrometryBodySchema,
  epochPlanBodySchema,
  exposureBodySchema,
  visibilityQuerySchema,
  type EpochPlanBody,
  type ExposureBody,
} from "~/lib/astro/schemas";
import { MOON_CATEGORY_THRESHOLDS, MOON_TIME_RULE, REFRACTION_MODEL, type Limit, type Site } from "~/lib/astro/visibility";
import { AIRMASS_FORMULA, airmass as airmassAt, altitudeForAirmass } from "~/lib/astro/airmass";
import { MOONLIGHT_MODEL, moonlitSky, type MoonlightResult } from "~/lib/astro/moonlight";
import { runScienceTask } from "~/lib/astro/science-tasks";

const intEnv = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return Number.isInteger(v) && v > 0 ? v : fallback;
};

/** Requests a minute from one address, whatever they cost. */
export const RATE_LIMIT_PER_MINUTE = intEnv("SCIENCE_REQUESTS_PER_MINUTE", 600);
/**
 * Cost units a minute from one address. A unit is one night of one target: a visibility run
 * costs nights × targets, an epoch plan the nights of its baseline (the planner searches each)
 * plus one per epoch, an exposure or astrometry call 1 (astrometry: 1 per 50 epochs).
 */
export const COST_BUDGET_PER_MINUTE = intEnv("SCIENCE_BUDGET_PER_MINUTE", 30_000);
/** Visibility runs longer than this many nights go to the worker pool. */
export const HEAVY_VISIBILITY_NIGHTS = 31;

// Bounded: at most this many addresses are remembered (the oldest-used forgotten first).
const buckets = new Lru<string, { start: number; count: number; cost: number }>(10_000);

type Issue = { path: string; message: string };

class BadInput extends Error {
  constructor(readonly issues: Issue[]) {
    super(issues.map((i) => i.message).join("; "));
  }
}

const noStore = { "Cache-Control": "no-store" };

/** Refused for the client's budget (429) or the server's load (503); both carry Retry-After. */
class Refused extends Error {
  constructor(readonly status: 429 | 503, message: string, readonly retryAfterSeconds: number) {
    super(message);
  }
}

/**
 * The budget's key for a client address: an IPv4 address itself (also when written IPv4-mapped,
 * `::ffff:192.0.2.1`), an IPv6 address its /64. One host is routinely given a whole /64 (RFC 6177
 * and RFC 7934 recommend at least that per subscriber), so per address it could take a fresh
 * budget for every request.
 */
export function rateLimitKey(ip: string): string {
  const address = ip.trim().split("%")[0];
  const mapped = /^(?:0{0,4}:){0,5}:?ffff:(\d{1,3}(?:\.\d{1,3}){3})$/i.exec(address);
  if (mapped && isIPv4(mapped[1])) return mapped[1];
  if (!isIPv6(address)) return ip;
  const [head, tail] = address.includes("::") ? address.split("::") : [address, null];
  const groups = (part: string | null) => (part ? part.split(":").flatMap((g) => (g.includes(".") ? ["0", "0"] : [g])) : []);
  const h = groups(head);
  const t = groups(tail);
  const all = [...h, ...Array<string>(Math.max(0, 8 - h.length - t.length)).fill("0"), ...t];
  return `${all.slice(0, 4).map((g) => Number.parseInt(g || "0", 16).toString(16)).join(":")}::/64`;
}

function bucketOf(request: Request) {
  const ip = rateLimitKey(request.headers.get("x-nightshare-client-ip") ?? "unknown");
  const now = Date.now();
  let b = buckets.get(ip);
  if (!b || now - b.start >= 60_000) {
    b = { start: now, count: 0, cost: 0 };
    buckets.set(ip, b);
  }
  return { b, retry: Math.max(1, Math.ceil((b.start + 60_000 - now) / 1000)) };
}

function countRequest(request: Request) {
  const { b, retry } = bucketOf(request);
  b.count++;
  if (b.count > RATE_LIMIT_PER_MINUTE) throw new Refused(429, `Too many requests: at most ${RATE_LIMIT_PER_MINUTE} a minute from one address.`, retry);
}

/** Charges the request's cost to the address's budget, or refuses it (nothing is charged then). */
function charge(request: Request, cost: number) {
  const { b, retry } = bucketOf(request);
  if (cost > COST_BUDGET_PER_MINUTE) {
    throw new BadInput([{ path: "(body)", message: `this request costs ${cost} units, more than the ${COST_BUDGET_PER_MINUTE} allowed a minute; ask for fewer nights or a shorter baseline` }]);
  }
  if (b.cost + cost > COST_BUDGET_PER_MINUTE) {
    throw new Refused(
      429,
      `This address has used ${b.cost} of its ${COST_BUDGET_PER_MINUTE} computation units this minute; this request needs ${cost}. Try again later or ask for less.`,
      retry,
    );
  }
  b.cost += cost;
}

/** Runs a heavy task in the worker pool; a full queue or a timeout is a 503 with Retry-After. */
async function inPool<T>(task: Parameters<ReturnType<typeof computePool>["run"]>[0]): Promise<T> {
  try {
    return (await computePool().run(task)) as T;
  } catch (error) {
    if (error instanceof PoolBusy) throw new Refused(503, "The science workers are busy with other requests; try again shortly.", error.retryAfterSeconds);
    if (error instanceof PoolTimeout) throw new Refused(503, "The computation took too long and was stopped; ask for fewer nights or a shorter baseline, or try again later.", error.retryAfterSeconds);
    throw error;
  }
}

/** Wraps a handler: request count, zod issues → 400, budget 429, load 503, unknown failures → 503 JSON (never an HTML 500). */
async function guarded(request: Request, run: () => Promise<unknown>) {
  try {
    countRequest(request);
    return data(await run(), { headers: noStore });
  } catch (error) {
    if (error instanceof BadInput) return data({ error: "The request has invalid fields.", issues: error.issues }, { status: 400, headers: noStore });
    if (error instanceof Refused) {
      return data({ error: error.message, issues: [], retryAfterSeconds: error.retryAfterSeconds }, { status: error.status, headers: { ...noStore, "Retry-After": String(error.retryAfterSeconds) } });
    }
    console.error("science API failure", error);
    return data({ error: "The computation could not be completed; try again.", issues: [] }, { status: 503, headers: { ...noStore, "Retry-After": "5" } });
  }
}

function parse<S extends z.ZodType>(schema: S, input: unknown): z.output<S> {
  const r = schema.safeParse(input);
  if (!r.success) throw new BadInput(apiIssues(r.error).issues);
  return r.data;
}

async function jsonBody(request: Request): Promise<unknown> {
  const text = await request.text();
  if (text.length > 200_000) throw new BadInput([{ path: "(body)", message: "the body is larger than 200 kB" }]);
  try {
    return JSON.parse(text);
  } catch {
    throw new BadInput([{ path: "(body)", message: "the body is not valid JSON" }]);
  }
}

export function methodNotAllowed(allowed: string) {
  return data({ error: `Use ${allowed}.`, issues: [] }, { status: 405, headers: { Allow: allowed } });
}

/** A whole-hour time zone from the longitude, when the caller gives none (IANA Etc/GMT±N, sign inverted). */
export function zoneFromLongitude(lon: number): string {
  const h = Math.round(lon / 15);
  return h === 0 ? "UTC" : `Etc/GMT${h > 0 ? "-" : "+"}${Math.abs(h)}`;
}

async function telescopeSite(id: number, path: string): Promise<{ site: Site; telescope: Telescope }> {
  const t = await telescopeById(id);
  if (!t) throw new BadInput([{ path, message: `no telescope with id ${id}` }]);
  return { telescope: t, site: { latitudeDeg: t.latitudeDeg, longitudeDeg: t.longitudeDeg, elevationM: t.elevationM, timeZone: t.timeZone } };
}

function limitOf(q: { minAltitude?: number; maxAirmass?: number }): Limit {
  if (q.maxAirmass !== undefined) return { maxAirmass: q.maxAirmass };
  return { minAltitudeDeg: q.minAltitude ?? 30 };
}

export const CONVENTIONS = {
  refraction: REFRACTION_MODEL,
  airmass: AIRMASS_FORMULA,
  twilight: "Sun's centre at −18°, geometric",
  moonCategoryThresholds: MOON_CATEGORY_THRESHOLDS,
  moonCategoryRule: MOON_TIME_RULE,
  nightMoonCategory: "a night's moonCategory is that of the Moon's illuminated fraction at the middle of the dark interval",
};

export async function visibilityResponse(request: Request) {
  return guarded(request, async () => {
    const params = Object.fromEntries(new URL(request.url).searchParams);
    const q = parse(visibilityQuerySchema, params);
    const site: Site =
      q.telescope !== undefined
        ? (await telescopeSite(q.telescope, "telescope")).site
        : { latitudeDeg: q.lat!, longitudeDeg: q.lon!, elevationM: q.elevation ?? 0, timeZone: q.timeZone ?? zoneFromLongitude(q.lon!) };
    const target = { raDeg: q.ra, decDeg: q.dec, pmRaCosDecMasPerYr: q.pmRa, pmDecMasPerYr: q.pmDec };
    // one target: nights × 1 (+1 for the altitude curve of one night)
    charge(request, q.nights + (q.night ? 1 : 0));
    const task = { kind: "visibility" as const, input: { site, target, from: q.from, nights: q.nights, limit: limitOf(q) }, night: q.night };
    const result = q.nights > HEAVY_VISIBILITY_NIGHTS ? await inPool<Record<string, unknown>>(task) : (runScienceTask(task) as Record<string, unknown>);
    return { ...result, conventions: CONVENTIONS };
  });
}

async function exposureInput(b: ExposureBody): Promise<ExposureInput & { moonlight?: MoonlightResult }> {
  let telescope = b.telescope;
  let instrument = b.instrument;
  let zeroPointPhotons: number | undefined;
  let extinction = b.extinctionMagPerAirmass;
  let sky = b.skyMagPerArcsec2;
  if (b.instrumentId !== undefined) {
    const inst = await instrumentWithFilters(b.instrumentId);
    if (!inst) throw new BadInput([{ path: "instrumentId", message: `no instrument with id ${b.instrumentId}` }]);
    instrument ??= {
      throughput: inst.throughput,
      pixelScaleArcsec: inst.pixelScaleArcsec,
      readNoiseE: inst.readNoiseE,
      darkEPerPixelPerS: inst.darkEPerPixelPerS,
      fullWellE: inst.fullWellE,
    };
    const filter = inst.filters?.find((f) => f.band === b.band);
    if (!filter) throw new BadInput([{ path: "band", message: `instrument ${b.instrumentId} has no ${b.band} filter` }]);
    zeroPointPhotons = filter.zeroPointPhotons;
    extinction ??= filter.extinctionMagPerAirmass;
    if (sky === undefined && b.moon !== undefined) sky = filter.skyDarkMag; // the band's dark sky; moonlight added below
    else if (sky === undefined) {
      const cat = b.moonCategory ?? "dark";
      sky = cat === "dark" ? filter.skyDarkMag : cat === "grey" ? filter.skyGreyMag : filter.skyBrightMag;
    }
    if (!telescope && b.telescopeId === undefined) {
      const t = await telescopeById(inst.telescopeId);
      if (t) telescope = { apertureM: t.apertureM, centralObstruction: t.centralObstruction };
    }
  }
  if (!telescope && b.telescopeId !== undefined) {
    const { telescope: t } = await telescopeSite(b.telescopeId, "telescopeId");
    telescope = { apertureM: t.apertureM, centralObstruction: t.centralObstruction };
  }
  if (!telescope) throw new BadInput([{ path: "telescope", message: "telescope or telescopeId is required" }]);
  if (!instrument) throw new BadInput([{ path: "instrument", message: "instrument or instrumentId is required" }]);
  // Airmass from the target's altitude when only that is given (Kasten & Young), and the Moon's
  // light added to the band's dark sky by Krisciunas & Schaefer (1991) when the Moon is given.
  const airmass = b.airmass ?? airmassAt(b.targetAltitudeDeg as number);
  let moonlight: MoonlightResult | undefined;
  if (b.moon !== undefined) {
    const band = b.band as Band;
    moonlight = moonlitSky({
      band,
      darkZenithMag: sky ?? SKY_BRIGHTNESS[band].dark,
      extinctionMagPerAirmass: extinction ?? EXTINCTION[band],
      moon: b.moon,
      targetAltitudeDeg: b.targetAltitudeDeg ?? altitudeForAirmass(airmass),
    });
    sky = moonlight.skyMagPerArcsec2;
  }
  const common = {
    band: b.band as Band,
    magnitude: b.magnitude,
    airmass,
    ...(moonlight ? { moonlight } : {}),
    seeingArcsec: b.seeingArcsec,
    skyMagPerArcsec2: sky,
    moonCategory: b.moonCategory,
    extinctionMagPerAirmass: extinction,
    zeroPointPhotons,
    telescope,
    instrument,
  };
  return b.snr !== undefined ? { ...common, snr: b.snr } : { ...common, exposureSeconds: b.exposureSeconds as number };
}

export async function exposureResponse(request: Request) {
  return guarded(request, async () => {
    const b = parse(exposureBodySchema, await jsonBody(request));
    charge(request, 1);
    const input = await exposureInput(b);
    const r = computeExposure(input);
    return {
      ...r,
      airmass: input.airmass,
      ...(input.moonlight
        ? { sky: { model: MOONLIGHT_MODEL, darkSkyMagPerArcsec2: input.moonlight.darkSkyMagPerArcsec2, moonlightMagPerArcsec2: input.moonlight.moonlightMagPerArcsec2, terms: input.moonlight.terms } }
        : { sky: { model: "the band's tabulated sky for the moon category (dark unless given)" } }),
      zeroPointPhotons: input.zeroPointPhotons ?? ZERO_POINTS[input.band].photonsPerSecondCm2,
      conventions: {
        equation: "SNR = N* / sqrt(N* + n_pix (N_sky + N_dark + RN²)) (Howell; Merline & Howell 1995)",
        aperture: "radius = 1 × FWHM of the seeing (93.75 % of a Gaussian PSF)",
        zeroPoints: "Bessell, Castelli & Plez (1998) unless the instrument's filter sets its own",
      },
    };
  });
}

export async function astrometryResponse(request: Request) {
  return guarded(request, async () => {
    const b = parse(astrometryBodySchema, await jsonBody(request));
    charge(request, Math.ceil(b.epochs.length / 50));
    const r = astrometryForDates({ raDeg: b.raDeg, decDeg: b.decDeg, epochs: b.epochs, positionalPrecisionMas: b.positionalPrecisionMas });
    if (!r.determined) {
      throw new BadInput([{ path: "epochs", message: "these epochs cannot separate position, proper motion and parallax (spread them over different dates)" }]);
    }
    return r;
  });
}

/** Nights of the baseline (the planner searches each) plus one per epoch asked for (60 when derived). */
export function epochPlanCost(b: { baselineYears: number; epochs?: number; movedEpochs?: string[] }) {
  const nights = Math.min(Math.round(b.baselineYears * 365.25) + 1, 366 * 6);
  return nights + (b.epochs ?? 60) + (b.movedEpochs?.length ?? 0);
}

async function planInput(b: EpochPlanBody) {
  const site = b.site ?? (await telescopeSite(b.telescopeId as number, "telescopeId")).site;
  const perEpoch = b.perEpochPrecisionMas ?? epochPrecisionMas({ fwhmArcsec: b.fwhmArcsec!, snr: b.snr!, frames: b.frames ?? 1, floorMas: b.floorMas ?? 0 });
  const required =
    b.requiredProperMotionMasPerYr !== undefined
      ? { properMotionMasPerYr: b.requiredProperMotionMasPerYr }
      : b.requiredTangentialVelocityKmS !== undefined
        ? { tangentialVelocityKmS: b.requiredTangentialVelocityKmS, distancePc: b.distancePc as number }
        : undefined;
  return { site, perEpoch, required };
}

export async function epochPlanResponse(request: Request) {
  return guarded(request, async () => {
    const b = parse(epochPlanBodySchema, await jsonBody(request));
    charge(request, epochPlanCost(b));
    const [{ site, perEpoch, required }, semesters] = await Promise.all([planInput(b), officeSemesters()]);
    const target = { raDeg: b.target.ra, decDeg: b.target.dec, pmRaCosDecMasPerYr: b.target.pmRaCosDecMasPerYr, pmDecMasPerYr: b.target.pmDecMasPerYr };
    const { plan, moved } = await inPool<{ plan: Plan; moved?: FitPrecision }>({
      kind: "epochPlan",
      input: {
        site,
        target,
        firstDate: b.firstDate,
        baselineYears: b.baselineYears,
        epochs: b.epochs,
        required,
        perEpochPrecisionMas: perEpoch,
        limit: limitOf(b),
        secondsPerEpoch: b.secondsPerEpoch,
        toleranceNights: b.toleranceNights,
        semesters,
      },
      moved: b.movedEpochs ? { raDeg: target.raDeg, decDeg: target.decDeg, times: b.movedEpochs, perEpochPrecisionMas: perEpoch } : undefined,
    });
    // Is the per-epoch precision set by the instrument's floor? (only when it is built from fwhm, snr, frames, floor)
    const photon = b.perEpochPrecisionMas === undefined ? centroidPrecisionMas(b.fwhmArcsec!, b.snr!) / Math.sqrt(b.frames ?? 1) : null;
    const floorDominated = photon !== null && (b.floorMas ?? 0) >= photon;
    const advice = [
      ...(floorDominated
        ? [`The per-epoch precision (${perEpoch.toFixed(2)} mas) is set by the systematic floor of ${b.floorMas} mas (photon noise alone gives ${photon!.toFixed(2)} mas): more frames or longer exposures cannot improve it; more epochs or a longer baseline can.`]
        : []),
      ...(plan.met === false ? [`The requirement is not met with ${plan.epochs.length} epochs over ${b.baselineYears} years${b.epochs === undefined ? " (the most that fit the windows, spread apart)" : ""}: a longer baseline or a better per-epoch precision is needed.`] : []),
    ];
    return {
      site,
      target,
      perEpochPrecisionMas: perEpoch,
      perEpoch: { photonPrecisionMas: photon, floorMas: b.floorMas ?? null, floorDominated },
      advice,
      ...plan,
      ...(moved ? { movedPrecision: moved } : {}),
    };
  });
}
