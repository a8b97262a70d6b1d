// Visibility: our prepared-site path against a fair naive one, both sides measured in this run.
// Naive = astronomy-engine's own searches, with the site's Sun and Moon events (sunset, sunrise,
// astronomical twilight, moonrise, moonset, the Moon's phase and altitude at mid-darkness)
// searched once per night and shared by all targets, then per target and night its rise and set
// through the limit altitude in the dark interval, the windows and the Moon's separation: the
// same fields as ours. Ratios compare like with like: site work plus targets on both sides, and
// the per-target cost on both sides once the site is known.
import { spawnSync } from "node:child_process";
import path from "node:path";
import * as Astro from "astronomy-engine";
import { repoRoot } from "../../app/cli/services";
import { addDays } from "../../app/lib/astro/time";
import { clearSiteCache, computeVisibility, prepareSiteNights, targetNights, type Site } from "../../app/lib/astro/visibility";

const SITE: Site = { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" }; // invented
const FROM = "2027-02-01";
const NIGHTS = 183;
const LIMIT = 30;
const NAIVE_TARGETS = 12;

function targets(n: number) {
  // deterministic pseudo-random invented targets, −40° < δ < +80°
  let s = 12345;
  const rnd = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
  return Array.from({ length: n }, () => ({ raDeg: 360 * rnd(), decDeg: -40 + 120 * rnd() }));
}

const ms = (f: () => void) => {
  const t = performance.now();
  f();
  return performance.now() - t;
};
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const f1 = (x: number) => (x >= 1000 ? `${(x / 1000).toFixed(2)} s` : x >= 10 ? `${x.toFixed(0)} ms` : `${x.toFixed(2)} ms`);

type NaiveNight = { sunset: number | null; sunrise: number | null; darkStart: number | null; darkEnd: number | null; moonrise: number | null; moonset: number | null; moonIllumination: number; moonAltitudeDeg: number; moonRaH: number; moonDecDeg: number; mid: Astro.AstroTime | null };

/** The site's events, once per night (local noon to local noon, as ours). */
function naiveSite(from: string, nights: number): NaiveNight[] {
  const obs = new Astro.Observer(SITE.latitudeDeg, SITE.longitudeDeg, SITE.elevationM);
  const out: NaiveNight[] = [];
  for (let i = 0; i < nights; i++) {
    // local noon at this site's standard offset (UTC−7) is close enough for a search start
    const noon = Astro.MakeTime(new Date(`${addDays(from, i)}T19:00:00Z`));
    const sunset = Astro.SearchRiseSet(Astro.Body.Sun, obs, -1, noon, 1);
    const ds = Astro.SearchAltitude(Astro.Body.Sun, obs, -1, noon, 1, -18);
    const de = ds ? Astro.SearchAltitude(Astro.Body.Sun, obs, +1, ds, 1, -18) : null;
    const sunrise = Astro.SearchRiseSet(Astro.Body.Sun, obs, +1, sunset ?? noon, 1);
    const moonrise = Astro.SearchRiseSet(Astro.Body.Moon, obs, +1, noon, 1);
    const moonset = Astro.SearchRiseSet(Astro.Body.Moon, obs, -1, noon, 1);
    const mid = ds && de ? ds.AddDays((de.ut - ds.ut) / 2) : null;
    const at = mid ?? noon.AddDays(0.5);
    const moonEq = Astro.Equator(Astro.Body.Moon, at, obs, true, true);
    const moonHor = Astro.Horizon(at, obs, moonEq.ra, moonEq.dec);
    out.push({
      sunset: sunset?.date.getTime() ?? null,
      sunrise: sunrise?.date.getTime() ?? null,
      darkStart: ds?.date.getTime() ?? null,
      darkEnd: de?.date.getTime() ?? null,
      moonrise: moonrise?.date.getTime() ?? null,
      moonset: moonset?.date.getTime() ?? null,
      moonIllumination: Astro.Illumination(Astro.Body.Moon, at).phase_fraction,
      moonAltitudeDeg: moonHor.altitude,
      moonRaH: moonEq.ra,
      moonDecDeg: moonEq.dec,
      mid,
    });
  }
  return out;
}

/** One target over the shared nights: windows above the limit in darkness, hours, Moon separation. */
function naiveTarget(site: NaiveNight[], target: { raDeg: number; decDeg: number }) {
  const obs = new Astro.Observer(SITE.latitudeDeg, SITE.longitudeDeg, SITE.elevationM);
  Astro.DefineStar(Astro.Body.Star1, target.raDeg / 15, target.decDeg, 1e6);
  return site.map((n) => {
    if (n.darkStart === null || n.darkEnd === null) return { windows: [] as { start: number; end: number }[], observableHours: 0, moonSeparationDeg: NaN };
    const ds = Astro.MakeTime(new Date(n.darkStart));
    const span = (n.darkEnd - n.darkStart) / 86_400_000;
    const eq = Astro.Equator(Astro.Body.Star1, ds, obs, true, true);
    const upAtStart = Astro.Horizon(ds, obs, eq.ra, eq.dec).altitude > LIMIT;
    const rise = Astro.SearchAltitude(Astro.Body.Star1, obs, +1, ds, span, LIMIT)?.date.getTime() ?? null;
    const set = Astro.SearchAltitude(Astro.Body.Star1, obs, -1, ds, span, LIMIT)?.date.getTime() ?? null;
    const windows: { start: number; end: number }[] = [];
    if (upAtStart) {
      windows.push({ start: n.darkStart, end: set ?? n.darkEnd });
      if (set !== null && rise !== null && rise > set) windows.push({ start: rise, end: n.darkEnd });
    } else if (rise !== null) {
      windows.push({ start: rise, end: set !== null && set > rise ? set : n.darkEnd });
    }
    const observableHours = windows.reduce((h, w) => h + (w.end - w.start) / 3_600_000, 0);
    const sep = Astro.AngleBetween(Astro.VectorFromSphere(new Astro.Spherical(target.decDeg, target.raDeg, 1), ds), Astro.VectorFromSphere(new Astro.Spherical(n.moonDecDeg, n.moonRaH * 15, 1), ds));
    return { windows, observableHours, moonSeparationDeg: sep };
  });
}

/** The first call of a new process: node + tsx, the module imported, then one cold call timed. */
function firstCallInNewProcess(): { call: number; importMs: number } | null {
  const script = `
    const t0 = performance.now();
    const v = await import(${JSON.stringify(path.join(repoRoot, "app/lib/astro/visibility.ts"))});
    const t1 = performance.now();
    v.targetNights(v.prepareSiteNights(${JSON.stringify(SITE)}, "${FROM}", ${NIGHTS}), { raDeg: 150, decDeg: 20 }, ${LIMIT});
    console.log(JSON.stringify({ importMs: t1 - t0, call: performance.now() - t1 }));`;
  const r = spawnSync(process.execPath, ["--import", "tsx", "--input-type=module", "-e", script], { cwd: repoRoot, encoding: "utf8" });
  try {
    return JSON.parse(r.stdout.trim().split("\n").pop()!) as { call: number; importMs: number };
  } catch {
    return null;
  }
}

export function runAstroBench(): string[] {
  const lines: string[] = [];
  const many = targets(500);
  const one = many[0];

  // cold: the first call of a new process, then 10 fresh date ranges in this one (site cache empty)
  const fresh = firstCallInNewProcess();
  // the code warmed first on three other ranges: "cold" here is the site's cache, not the JIT
  for (let k = 0; k < 3; k++) targetNights(prepareSiteNights(SITE, addDays(FROM, -4000 - 400 * k), NIGHTS), one, LIMIT);
  const coldRuns: number[] = [];
  for (let k = 0; k < 10; k++) {
    clearSiteCache();
    // disjoint ranges, none computed before in this process
    coldRuns.push(ms(() => targetNights(prepareSiteNights(SITE, addDays(FROM, 400 * (k + 1)), NIGHTS), one, LIMIT)));
  }
  const cold = median(coldRuns);
  // the site's part alone (cold) and 500 targets on a freshly prepared site (site work included)
  const withSite500 = median(Array.from({ length: 5 }, (_, k) => { clearSiteCache(); return ms(() => { const p = prepareSiteNights(SITE, addDays(FROM, -400 * (k + 1)), NIGHTS); for (const t of many) targetNights(p, t, LIMIT); }); }));
  // warm: the site prepared (and its Moon times), per target
  const prepared = prepareSiteNights(SITE, FROM, NIGHTS);
  for (let i = 0; i < 50; i++) targetNights(prepared, one, LIMIT);
  const warm1 = median(Array.from({ length: 51 }, () => ms(() => targetNights(prepared, one, LIMIT))));
  const warm500 = median(Array.from({ length: 5 }, () => ms(() => { for (const t of many) targetNights(prepared, t, LIMIT); })));
  // JSON (the API's shape, ISO strings) against the numbers, both warm, median after warm-up
  for (let i = 0; i < 2; i++) for (const t of many) computeVisibility({ site: SITE, target: t, from: FROM, nights: NIGHTS, limit: { minAltitudeDeg: LIMIT } });
  const json500 = median(Array.from({ length: 5 }, () => ms(() => { for (const t of many) computeVisibility({ site: SITE, target: t, from: FROM, nights: NIGHTS, limit: { minAltitudeDeg: LIMIT } }); })));

  // naive: the site once, then per target (NAIVE_TARGETS measured; 500 extrapolated from them)
  let naiveNights: NaiveNight[] = [];
  const naiveSiteMs = ms(() => (naiveNights = naiveSite(FROM, NIGHTS)));
  const sample = many.slice(0, NAIVE_TARGETS);
  const refs: ReturnType<typeof naiveTarget>[] = [];
  const naivePerTarget = ms(() => { for (const t of sample) refs.push(naiveTarget(naiveNights, t)); }) / sample.length;
  const naive1 = naiveSiteMs + naivePerTarget;
  const naive500 = naiveSiteMs + 500 * naivePerTarget;

  // agreement: twilight and window edges, ours against the naive searches
  let worst = 0;
  let edges = 0;
  for (let i = 0; i < NIGHTS; i++) {
    const n = prepared.nights[i];
    if (n.darkStart !== null && naiveNights[i].darkStart !== null) worst = Math.max(worst, Math.abs(n.darkStart - naiveNights[i].darkStart!) / 1000, Math.abs(n.darkEnd! - naiveNights[i].darkEnd!) / 1000);
  }
  for (const [k, t] of sample.entries()) {
    const ours = targetNights(prepared, t, LIMIT);
    for (let i = 0; i < NIGHTS; i++) {
      const a = ours[i].windows;
      const b = refs[k][i].windows;
      if (a.length !== b.length) continue; // a window shorter than a search step: counted below
      for (let j = 0; j < a.length; j++) {
        worst = Math.max(worst, Math.abs(a[j].start - b[j].start) / 1000, Math.abs(a[j].end - b[j].end) / 1000);
        edges += 2;
      }
    }
  }
  const mismatched = sample.reduce((m, t, k) => m + targetNights(prepared, t, LIMIT).filter((r, i) => r.windows.length !== refs[k][i].windows.length).length, 0);

  lines.push(`site: invented, lat ${SITE.latitudeDeg}, ${NIGHTS} nights from ${FROM}, limit ${LIMIT}° altitude`);
  lines.push(`naive = astronomy-engine searches, Sun and Moon events once per night shared by all targets; per target 2 searches + 1 altitude per night`);
  lines.push(`cold, first call of a new process (after ${fresh ? f1(fresh.importMs) : "?"} to import the module): ${fresh ? f1(fresh.call) : "failed"}`);
  lines.push(`cold, 1 target, median of 10 fresh date ranges in this process (site cache empty): ${f1(cold)} (${f1(Math.min(...coldRuns))}–${f1(Math.max(...coldRuns))})   (naive, site + 1 target: ${f1(naive1)}; ×${(naive1 / cold).toFixed(0)})`);
  lines.push(`site work alone: ours ≈ ${f1(cold - warm1)} (cold minus warm), naive ${f1(naiveSiteMs)}`);
  lines.push(`500 targets including the site's work: ours ${f1(withSite500)}, naive ${f1(naive500)} (site + 500 × ${f1(naivePerTarget)}, from ${NAIVE_TARGETS} targets)  ×${(naive500 / withSite500).toFixed(0)}`);
  lines.push(`per target, site known: ours ${f1(warm1)} (median of 51), naive ${f1(naivePerTarget)}  ×${(naivePerTarget / warm1).toFixed(0)}`);
  lines.push(`500 targets, site known: ours ${f1(warm500)} (median of 5)`);
  lines.push(`500 targets as the API's JSON (ISO strings, summaries), median of 5 after warm-up: ${f1(json500)} = ×${(json500 / warm500).toFixed(1)} the numeric path`);
  lines.push(`agreement with astronomy-engine: max ${worst.toFixed(3)} s over ${edges} window edges and ${NIGHTS * 2} twilight events; ${mismatched} of ${NAIVE_TARGETS * NIGHTS} target-nights with a different number of windows`);
  return lines;
}
