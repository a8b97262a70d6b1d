// Visibility benchmark: the prepared-site fast path against astronomy-engine's searches.
import * as Astro from "astronomy-engine";
import { clearSiteCache, prepareSiteNights, targetNights, computeVisibility, type Site } from "../../app/lib/astro/visibility";

const SITE: Site = { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" }; // invented
const FROM = "2027-02-01";
const NIGHTS = 183;
const LIMIT = 30;

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

function naive(target: { raDeg: number; decDeg: number }) {
  const obs = new Astro.Observer(SITE.latitudeDeg, SITE.longitudeDeg, SITE.elevationM);
  Astro.DefineStar(Astro.Body.Star1, target.raDeg / 15, target.decDeg, 1e6);
  const out: { darkStart: number; darkEnd: number; rise: number | null; set: number | null }[] = [];
  let t = new Date(Date.UTC(2027, 1, 1, 19));
  for (let i = 0; i < NIGHTS; i++) {
    const ds = Astro.SearchAltitude(Astro.Body.Sun, obs, -1, t, 1, -18)!;
    const de = Astro.SearchAltitude(Astro.Body.Sun, obs, +1, ds, 1, -18)!;
    const rise = Astro.SearchAltitude(Astro.Body.Star1, obs, +1, ds, de.ut - ds.ut, LIMIT);
    const set = Astro.SearchAltitude(Astro.Body.Star1, obs, -1, ds, de.ut - ds.ut, LIMIT);
    out.push({ darkStart: ds.date.getTime(), darkEnd: de.date.getTime(), rise: rise?.date.getTime() ?? null, set: set?.date.getTime() ?? null });
    t = new Date(ds.date.getTime() + 12 * 3600e3);
  }
  return out;
}

export function runAstroBench(): string[] {
  const lines: string[] = [];
  const heap0 = process.memoryUsage().heapUsed;
  const one = targets(1)[0];

  const coldFirst = ms(() => targetNights(prepareSiteNights(SITE, FROM, NIGHTS), one, LIMIT));
  clearSiteCache();
  const coldAgain = ms(() => targetNights(prepareSiteNights(SITE, "2027-08-01", NIGHTS), one, LIMIT));
  const prepared = prepareSiteNights(SITE, FROM, NIGHTS);
  for (let i = 0; i < 50; i++) targetNights(prepared, one, LIMIT);
  const warmRuns = Array.from({ length: 50 }, () => ms(() => targetNights(prepared, one, LIMIT))).sort((a, b) => a - b);
  const warm = warmRuns[25];
  const many = targets(500);
  const manyRuns = Array.from({ length: 5 }, () => ms(() => { for (const t of many) targetNights(prepared, t, LIMIT); })).sort((a, b) => a - b);
  const manyJson = ms(() => { for (const t of many) computeVisibility({ site: SITE, target: t, from: FROM, nights: NIGHTS, limit: { minAltitudeDeg: LIMIT } }); });
  const heap1 = process.memoryUsage().heapUsed;

  const naiveTargets = many.slice(0, 5);
  let worst = 0;
  let edges = 0;
  const naiveMs = ms(() => {
    for (const t of naiveTargets) {
      const ref = naive(t);
      const ours = targetNights(prepared, t, LIMIT);
      for (let i = 0; i < NIGHTS; i++) {
        const n = ours[i].night;
        worst = Math.max(worst, Math.abs(ref[i].darkStart - n.darkStart!) / 1000, Math.abs(ref[i].darkEnd - n.darkEnd!) / 1000);
        for (const w of ours[i].windows) {
          if (w.start > n.darkStart! + 1 && ref[i].rise !== null) { worst = Math.max(worst, Math.abs(ref[i].rise! - w.start) / 1000); edges++; }
          if (w.end < n.darkEnd! - 1 && ref[i].set !== null) { worst = Math.max(worst, Math.abs(ref[i].set! - w.end) / 1000); edges++; }
        }
      }
    }
  });
  const naivePerTarget = naiveMs / naiveTargets.length; // includes our own (negligible) comparison pass

  lines.push(`site: invented, lat ${SITE.latitudeDeg}, ${NIGHTS} nights from ${FROM}, limit ${LIMIT}° altitude`);
  lines.push(`1 target × ${NIGHTS} nights, cold (first call in the process, JIT cold): ${coldFirst.toFixed(1)} ms`);
  lines.push(`1 target × ${NIGHTS} nights, cold (new dates, site cache empty, JIT warm): ${coldAgain.toFixed(1)} ms`);
  lines.push(`1 target × ${NIGHTS} nights, warm (site prepared; median of 50): ${warm.toFixed(3)} ms`);
  lines.push(`500 targets × ${NIGHTS} nights, warm (median of 5): ${manyRuns[2].toFixed(1)} ms`);
  lines.push(`500 targets × ${NIGHTS} nights as API JSON (ISO strings, summaries): ${manyJson.toFixed(1)} ms`);
  lines.push(`naive (astronomy-engine SearchAltitude per target per night): ${naivePerTarget.toFixed(1)} ms per target → 500 targets ≈ ${(naivePerTarget * 500 / 1000).toFixed(1)} s`);
  lines.push(`ratio naive / ours: 1 target warm ×${(naivePerTarget / warm).toFixed(0)}, 500 targets ×${((naivePerTarget * 500) / manyRuns[2]).toFixed(0)}`);
  lines.push(`max disagreement with astronomy-engine's search: ${worst.toFixed(3)} s over ${edges} window edges and ${naiveTargets.length * NIGHTS * 2} twilight events`);
  lines.push(`heapUsed delta over the fast-path runs: ${((heap1 - heap0) / 1048576).toFixed(1)} MB`);
  return lines;
}
