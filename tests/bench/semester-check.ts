// Semester check benchmark (issue 12: ≤ 5 s for 300 programmes × 2 telescopes × 183 nights × 200
// realisations). Synthetic programmes (invented targets, seeded) at the demo's invented site,
// windows and Moon time from the visibility module; the timed part is the pure scheduler
// (runSemesterCheck). Then the demo's call in review on a real MariaDB (tests/bench/services.ts),
// filled by rank: one programme's completion probability at a clear fraction of 1 and of 0.7.
import { dayNumber, DAY_MS } from "../../app/lib/astro/time";
import { ensureMoonTimes, prepareSiteNights, targetNights } from "../../app/lib/astro/visibility";
import type { AllocationTier, MoonCategory } from "../../app/lib/domain";
import { runSemesterCheck, type CheckInput, type CheckObservation, type CheckProgramme, type CheckTelescope } from "../../app/lib/allocation/semester-check";

const fmt = (ms: number) => (ms >= 1000 ? `${(ms / 1000).toFixed(2)} s` : `${ms.toFixed(0)} ms`);
const verdict = (ms: number, goal: number) => `${fmt(ms).padStart(8)}   goal ≤ ${fmt(goal)}  ${ms <= goal ? "met" : `MISSED by ${fmt(ms - goal)}`}`;
const SITE = { latitudeDeg: 40.2618, longitudeDeg: -5.2093, elevationM: 2350, timeZone: "Europe/Madrid" }; // the demo's invented site

export function syntheticCheckInput(programmeCount = 300, nights = 183, clear = 0.7): CheckInput {
  let s = 20261202;
  const rnd = () => (s = (s * 16807) % 2147483647) / 2147483647;
  const from = "2027-08-01";
  const prepared = prepareSiteNights(SITE, from, nights);
  ensureMoonTimes(prepared);
  const telescopes: CheckTelescope[] = [1, 2].map((id) => ({
    telescopeId: id,
    name: `Bench telescope ${id}`,
    siteKey: "bench-site",
    clearFractions: Array(12).fill(clear),
    nights: prepared.nights.map((n) => ({ date: n.date, month: Number(n.date.slice(5, 7)), darkStart: n.darkStart, darkEnd: n.darkEnd, moonUp: n.moon?.up ?? [], upCategory: n.moonCategory })),
  }));
  const moons: MoonCategory[] = ["dark", "grey", "bright"];
  const programmes: CheckProgramme[] = [];
  for (let i = 0; i < programmeCount; i++) {
    const tier: AllocationTier = i < 100 ? "assured" : i < 220 ? "queue" : "filler";
    const astrometric = i % 3 === 0;
    const allocation: CheckProgramme["allocation"] = [];
    const observations: CheckObservation[] = [];
    for (const telescopeId of [1, 2]) {
      const raDeg = rnd() * 360;
      const decDeg = -20 + rnd() * 90;
      const rows = targetNights(prepared, { raDeg, decDeg }, 30, { moonSplit: false });
      const moonCategory = moons[Math.floor(rnd() * 3)];
      const visitHours = 0.3 + rnd() * 1.7;
      const usableNights = rows.map((r, n) => (r.observableHours >= visitHours ? n : -1)).filter((n) => n >= 0);
      let visits = 2 + Math.floor(rnd() * 7);
      let astrometry: CheckObservation["astrometry"] = null;
      if (astrometric && usableNights.length) {
        const picks = [usableNights[Math.floor(usableNights.length * 0.2)], usableNights[Math.floor(usableNights.length * 0.8)]];
        visits = picks.length;
        astrometry = {
          raDeg,
          decDeg,
          perEpochPrecisionMas: 3 + rnd() * 5,
          requiredPmPrecisionMasPerYr: 1 + rnd() * 2,
          epochs: picks.map((n) => ({ date: prepared.nights[n].date, fromNight: Math.max(0, n - 7), toNight: Math.min(nights - 1, n + 7) })),
          otherEpochTimes: [1, 2, 3, 4].map((k) => (dayNumber(from) + 182 * k + 60) * DAY_MS),
        };
      }
      observations.push({ observationId: i * 2 + telescopeId, label: `bench ${i}/${telescopeId}`, telescopeId, moonCategory, visitHours, visits, windows: rows.map((r) => r.windows), astrometry });
      allocation.push({ telescopeId, moonCategory, hours: visits * visitHours });
    }
    programmes.push({ proposalId: i + 1, code: `${String(i + 1).padStart(3, "0")}/27B`, title: `Bench programme ${i + 1}`, tier, position: i + 1, allocation, observations });
  }
  return { semesterCode: "27B", telescopes, programmes };
}

export async function runSemesterCheckBench(): Promise<string[]> {
  const lines: string[] = [];
  let t = performance.now();
  const input = syntheticCheckInput();
  lines.push(`input: 300 programmes × 2 telescopes × 183 nights (windows and Moon time from the visibility module): ${fmt(performance.now() - t)} (not part of the goal)`);
  for (let run = 1; run <= 3; run++) {
    t = performance.now();
    const result = runSemesterCheck(input, { realisations: 200, seed: run });
    const ms = performance.now() - t;
    const flagged = result.programmes.filter((p) => p.flag).length;
    const use = result.telescopes.map((x) => `${(x.expectedUseOfDark * 100).toFixed(0)} %`).join(" / ");
    lines.push(`semester check 300 × 2 × 183 × 200 realisations (seed ${run}): ${verdict(ms, 5000)} — ${flagged} flagged, use of dark time ${use}`);
  }

  // the demo's call in review, filled by rank
  const { benchServices } = await import("./services");
  const services = await benchServices();
  try {
    const { Call, Proposal, User } = await import("../../app/models/index.server");
    const { demoCallPlan } = await import("../../sequelize/seeders/20261201000100-demo-observatory");
    const { fillAllocationByRank } = await import("../../app/lib/allocation/allocate.server");
    const { semesterCheckFacts } = await import("../../app/lib/allocation/semester-check.server");
    const { checkInputFromFacts } = await import("../../app/lib/allocation/semester-check-input");
    const call = await Call.findOne({ where: { semesterCode: demoCallPlan().review.semesterCode } });
    const chair = await User.findOne({ where: { email: "chair@kestrel-ridge.example" } });
    if (!call || !chair) throw new Error("the demo's call in review or its chair is missing");
    await fillAllocationByRank({ actor: chair, callId: call.id });
    t = performance.now();
    const facts = await semesterCheckFacts({ callId: call.id });
    const factsMs = performance.now() - t;
    t = performance.now();
    const demoInput = checkInputFromFacts(facts);
    const inputMs = performance.now() - t;
    lines.push(`demo call ${call.semesterCode}: ${facts.programmes.length} programmes with a tier; facts from the database ${fmt(factsMs)}, input (sheets, windows) ${fmt(inputMs)}`);
    const withClear = (cf: number): CheckInput => ({ ...demoInput, telescopes: demoInput.telescopes.map((x) => ({ ...x, clearFractions: Array(12).fill(cf) })) });
    t = performance.now();
    const clear = runSemesterCheck(withClear(1), { realisations: 200, seed: 1 });
    const clearMs = performance.now() - t;
    const cloudy = runSemesterCheck(withClear(0.7), { realisations: 200, seed: 1 });
    lines.push(`demo check, 200 realisations: ${fmt(clearMs)}`);
    const byId = new Map(cloudy.programmes.map((p) => [p.proposalId, p]));
    // the programmes that feel the weather most, and one astrometric programme
    const shown = [...clear.programmes]
      .filter((p) => p.completionProbability !== null)
      .sort((a, b) => (byId.get(a.proposalId)!.completionProbability ?? 1) - (byId.get(b.proposalId)!.completionProbability ?? 1))
      .slice(0, 3);
    const astro = clear.programmes.find((p) => p.epochs && !shown.includes(p));
    for (const p of [...shown, ...(astro ? [astro] : [])]) {
      const q = byId.get(p.proposalId)!;
      const title = (await Proposal.findByPk(p.proposalId))?.title ?? "";
      const pct = (x: number | null) => (x === null ? "–" : `${(x * 100).toFixed(1)} %`);
      lines.push(
        `  ${p.code} ${p.tier.padEnd(7)} "${title.slice(0, 48)}": completes ${pct(p.completionProbability)} at clear fraction 1, ${pct(q.completionProbability)} at 0.7` +
          (p.epochs ? ` (epochs ${p.epochs.expectedAchieved.toFixed(2)} / ${q.epochs!.expectedAchieved.toFixed(2)} of ${p.epochs.planned})` : "") +
          `; executed ${pct(p.expectedExecutedFraction)} / ${pct(q.expectedExecutedFraction)}`,
      );
    }
    // the office's own (seeded, invented) monthly clear fractions, as the chair's check uses them
    const seeded = runSemesterCheck(demoInput, { realisations: 200, seed: 1 });
    const seededById = new Map(seeded.programmes.map((p) => [p.proposalId, p]));
    const worst = [...seeded.programmes].filter((p) => p.completionProbability !== null).sort((a, b) => a.completionProbability! - b.completionProbability!)[0];
    if (worst) lines.push(`  with the office's monthly clear fractions: lowest completion ${worst.code} ${((seededById.get(worst.proposalId)!.completionProbability ?? 0) * 100).toFixed(1)} %`);
    lines.push(`  use of dark time at 1 / 0.7: ${clear.telescopes.map((x, i) => `${x.name} ${(x.expectedUseOfDark * 100).toFixed(1)} % / ${(cloudy.telescopes[i].expectedUseOfDark * 100).toFixed(1)} %`).join("; ")}`);
  } finally {
    await services.stop();
  }
  return lines;
}
